#pragma once
// The report's figures, each an inline SVG built with SvgPlot from a finished Report. A figure that
// has nothing to show (no certificate for the joint region, no tolerance for the error plot) is
// absent (empty optional); the report's notes say why.
#include <optional>
#include <string>

#include "report_model.hpp"

namespace rigcal::report {

struct Figure {
  std::string id;       // the <svg> id, e.g. "plot-calibration"
  std::string caption;  // plain text
  std::string svg;
};

// Data, fitted line with its confidence and prediction bands, certified line, York line.
Figure calibration_figure(const Report& r);
// Residuals y - fit(x) against the reference value, with both bands drawn about the fitted line and
// the certified line's difference from it.
Figure residual_reference_figure(const Report& r);
// Residuals against time (UTC) or, without time stamps, against the order of the pairs.
Figure residual_time_figure(const Report& r);
// The joint confidence region of (b0, b1) with the certified point and the separate intervals
// (line model with a certificate only).
std::optional<Figure> joint_region_figure(const Report& r);
// The sensor's error e(x) +- U_e over the range against +-MPE, with the checked points.
std::optional<Figure> tolerance_figure(const Report& r);
// Standard uncertainty of the corrected value against the number of averaged readings m (log m).
Figure averaging_figure(const Report& r);

}  // namespace rigcal::report
