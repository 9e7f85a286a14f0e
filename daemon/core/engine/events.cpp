#include "rigcal/engine/events.hpp"

namespace rigcal::engine {

std::string_view alert_kind_name(AlertKind k) {
  switch (k) {
    case AlertKind::drift: return "drift";
    case AlertKind::calibration_due: return "calibration_due";
    case AlertKind::tolerance: return "tolerance";
  }
  return "drift";
}

std::string_view quality_name(Quality q) {
  switch (q) {
    case Quality::good: return "good";
    case Quality::uncertain: return "uncertain";
    case Quality::bad: return "bad";
  }
  return "bad";
}

std::uint32_t opc_ua_severity(Quality q) {
  switch (q) {
    case Quality::good: return 0x00000000u;
    case Quality::uncertain: return 0x40000000u;
    case Quality::bad: return 0x80000000u;
  }
  return 0x80000000u;
}

}  // namespace rigcal::engine
