// The frame every report page shares (see report_page.hpp).

#include "report_page.hpp"

#include "gutterwatt/design.hpp"
#include "report_format.hpp"

namespace gutterwatt::detail {

namespace {

constexpr const char* kStyle = R"css(
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { font: 15px/1.45 sans-serif; color: #1b1b1b; background: #ffffff; margin: 0 auto;
  max-width: 1160px; padding: 20px 24px 48px; }
header h1 { font-size: 1.65em; margin: 0 0 .15em; }
header p { margin: 0; color: #444; }
h2 { font-size: 1.25em; margin: 1.8em 0 .5em; padding-bottom: .2em; border-bottom: 1px solid #cfcfcf; }
h3 { font-size: 1.05em; margin: 1.3em 0 .3em; }
p { max-width: 60em; }
.lead { font-size: 1.05em; }
.tables { display: flex; flex-wrap: wrap; gap: 10px 48px; align-items: flex-start; }
table { border-collapse: collapse; font-variant-numeric: tabular-nums; margin: .4em 0 .8em; }
caption { text-align: left; font-weight: 600; padding-bottom: .3em; }
th, td { padding: 3px 12px 3px 0; border-bottom: 1px solid #e6e6e6; text-align: left;
  vertical-align: baseline; }
thead th { border-bottom: 1.5px solid #999; font-weight: 600; }
td.n, th.n { text-align: right; padding-left: 12px; }
td.sub { padding-left: 1.2em; color: #444; }
tr.best td { font-weight: 600; }
.wide { overflow-x: auto; }
.ranked { font-size: .92em; }
.ranked thead th { vertical-align: bottom; }
.ranked.many { font-size: .8em; }
.ranked.many th, .ranked.many td { padding-right: 6px; padding-left: 6px; }
.ranked th.rank, .ranked td.rank { background: #f4f4f4; }
figure { margin: 1em 0 1.4em; }
figcaption { font-size: .9em; color: #3a3a3a; margin-top: .3em; max-width: 60em; }
svg.chart { display: block; width: 100%; max-width: 1100px; height: auto; }
svg text { font-family: sans-serif; font-size: 12px; fill: #222222; }
svg text.ptitle { font-size: 13px; font-weight: 600; }
svg text.tick { fill: #3a3a3a; }
svg text.axis { fill: #3a3a3a; font-size: 12.5px; }
svg text.val { font-size: 11px; fill: #333333; }
svg text.cell { font-size: 12px; fill: #111111; }
svg text.cell.light { fill: #ffffff; }
svg text.key { font-family: monospace; font-size: 10.5px; fill: #555555; }
small.key { font-weight: normal; color: #555; }
.note { color: #444; font-style: italic; }
.cautions { border-left: 4px solid #D55E00; background: #fbf4ee; padding: .6em 1.2em .8em; }
.cautions li { margin: .35em 0; }
#warnings { border-left: 4px solid #E69F00; background: #fdf8ec; padding: .2em 1.2em .6em; }
#warnings li { margin: .35em 0; max-width: 60em; }
footer { margin-top: 2em; font-size: .85em; color: #555; }
@media print {
  @page { size: A4 landscape; margin: 12mm 14mm; }
  body { max-width: none; padding: 0; font-size: 10pt; }
  section { break-before: page; }
  section.first { break-before: auto; }
  h2 { break-after: avoid; margin-top: 0; }
  figure, table, .cautions, .closeup { break-inside: avoid; }
  h3 { break-after: avoid; }
  svg.chart { max-width: 100%; }
  .wide { overflow: visible; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
)css";

}  // namespace

std::string page_open(const std::string& title, const std::vector<std::string>& charts) {
  std::string ids;
  for (const auto& c : charts) ids += (ids.empty() ? "" : " ") + c;
  return "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
         "<meta name=\"generator\" content=\"gutterwatt report\">\n"
         "<meta name=\"gutterwatt-charts\" content=\"" +
         ids + "\">\n<title>" + escape(title) + "</title>\n<style>" + kStyle +
         "</style>\n</head>\n<body>\n";
}

namespace {

std::string cautions_section() {
  std::string html = "<section id=\"cautions\">\n<h2>Cautions</h2>\n<div class=\"cautions\">\n<p>" +
                     escape(kCautionsPreface) + "</p>\n<ul>\n";
  for (const Caution& c : safety_cautions()) {
    html += "<li><strong>" + escape(c.title) + ".</strong> " + escape(c.text) + "</li>\n";
  }
  return html + "</ul>\n</div>\n</section>\n";
}

}  // namespace

std::string page_close() {
  return cautions_section() +
         "<footer>Written by <code>gutterwatt report</code> from the files in the output folder. "
         "The page is self-contained: it loads nothing from "
         "elsewhere.</footer>\n</body>\n</html>\n";
}

std::string row_html(const std::string& label, const std::string& value, const std::string& extra,
                     bool sub) {
  return std::string("<tr><td") + (sub ? " class=\"sub\"" : "") + ">" + label +
         "</td><td class=\"n\">" + value + "</td>" +
         (extra.empty() ? "" : "<td class=\"n\">" + extra + "</td>") + "</tr>\n";
}

std::string with_unit(double v, const char* unit) { return pretty(v) + kNbsp + unit; }

std::string figure(const std::string& svg, const std::string& caption) {
  return "<figure>\n" + svg + "<figcaption>" + caption + "</figcaption>\n</figure>\n";
}

std::string quantity(UnitSystem units, double v, std::string_view si_unit) {
  const InUnits q = in_units(units, v, si_unit);
  return with_unit(q.value, unit_label(q.unit).c_str());
}

/// SI values in `si_unit`, in `units`.
std::vector<double> values_in(UnitSystem units, std::vector<double> v, std::string_view si_unit) {
  for (double& x : v) x = in_units(units, x, si_unit).value;
  return v;
}

}  // namespace gutterwatt::detail
