// The delay-versus-change figure: mean delay of each detector for the gain and offset steps, log-log.
#include "report.hpp"
#include "svg_plot.hpp"

namespace rigcal::study {

std::string delay_figure_svg(const StudyResults& r) {
  static const char* colours[] = {"#1f77b4", "#17becf", "#d62728", "#2ca02c", "#9467bd", "#8c564b"};
  SvgFigure f;
  f.title = "Detection delay at ARL0 = " + std::to_string(static_cast<long long>(r.options.target_arl0)) +
            " pairs (ChannelEngine, i.i.d. noise)";
  f.y_label = "mean delay (pairs, log scale)";
  SvgPanel gain{"Gain (slope) steps", "gain change, % (log scale)", true, {}};
  SvgPanel offset{"Offset steps", "offset change, sigma (log scale)", true, {}};
  for (std::size_t j = 0; j < r.columns.size(); ++j) {
    SvgSeries g{r.columns[j].label, colours[j % 6], {}, {}};
    SvgSeries o = g;
    for (std::size_t k = 0; k < r.changes.size(); ++k) {
      const auto& d = r.delays[k][j];
      if (d.runs == 0) continue;
      if (r.changes[k].kind == ChangeKind::gain_step) {
        g.x.push_back(100 * r.changes[k].size);
        g.y.push_back(d.mean);
      } else if (r.changes[k].kind == ChangeKind::offset_step) {
        o.x.push_back(r.changes[k].size);
        o.y.push_back(d.mean);
      }
    }
    gain.series.push_back(g);
    offset.series.push_back(o);
  }
  f.panels = {gain, offset};
  return render_svg(f);
}

}  // namespace rigcal::study
