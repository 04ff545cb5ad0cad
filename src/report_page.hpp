#pragma once
// The frame every report page shares: the head with its style sheet, the cautions and the foot,
// and the small pieces of HTML the sections are built from. Internal to the report.

#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/units.hpp"

namespace gutterwatt::detail {

/// From <!DOCTYPE> to <body>: the title and, in a <meta name="gutterwatt-charts">, the ids of
/// the charts the page holds (the render check looks for each).
std::string page_open(const std::string& title, const std::vector<std::string>& charts);

/// The cautions section, the footer and the closing tags.
std::string page_close();

/// A table row: label, value and, when `extra` is not empty, a third cell (pass " " for an empty
/// one in a three-column table). `sub` indents the label.
std::string row_html(const std::string& label, const std::string& value,
                     const std::string& extra = "", bool sub = false);

/// pretty(v) and its unit, joined by a no-break space.
std::string with_unit(double v, const char* unit);

/// An SI quantity (`si_unit` as in column names: L, mm, L_per_s) on the page, in `units`, with
/// its unit.
std::string quantity(UnitSystem units, double v, std::string_view si_unit);

/// SI values in `si_unit`, in `units`.
std::vector<double> values_in(UnitSystem units, std::vector<double> v, std::string_view si_unit);

/// A <figure> of `svg` with its caption (HTML).
std::string figure(const std::string& svg, const std::string& caption);

}  // namespace gutterwatt::detail
