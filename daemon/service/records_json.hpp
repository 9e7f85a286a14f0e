#pragma once
// The JSON (and CSV) forms of what rigcald writes: historian records, alert events, reject-file
// entries, status. Field names are documented in README ("Outputs") and stable.
#include <nlohmann/json.hpp>
#include <string>

#include "rigcal/engine/events.hpp"

namespace rigcal::service {

nlohmann::ordered_json historian_json(const engine::HistorianRecord& r);
// historian_json(r).dump(-1) without building the JSON value (the feed writes one per record).
std::string historian_json_line(const engine::HistorianRecord& r);
std::string historian_csv_header();
std::string historian_csv_row(const engine::HistorianRecord& r);
nlohmann::ordered_json alert_json(const engine::AlertEvent& e);
// A reject-file entry. `raw` may be any bytes: when not valid UTF-8 it is also given as hex.
nlohmann::ordered_json reject_json(protocol::TimeNs arrival, const std::string& source, std::uint64_t line,
                                   protocol::RejectReason reason, const std::string& detail, std::string_view raw);
// Finite numbers as numbers; NaN and infinity as null (JSON has neither).
nlohmann::ordered_json number_or_null(double v);

}  // namespace rigcal::service
