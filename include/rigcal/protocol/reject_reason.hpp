#pragma once
// Why a line or record was not taken into a channel's fit or averages. The names are stable: they
// appear in counters (rigcald_rejects_total{reason=...}), the reject file and the control socket.
#include <cstdint>
#include <string_view>

namespace rigcal::protocol {

enum class RejectReason : std::uint8_t {
  line_too_long,
  bad_utf8,
  control_character,
  unknown_record_type,
  missing_field,
  extra_field,
  bad_sequence,
  missing_sequence,
  bad_timestamp,
  bad_number,
  not_finite,
  bad_channel_name,
  unknown_channel,
  not_authenticated,
  unexpected_command,
  clock_future,
  clock_backwards,
  out_of_signal_range,
  outlier,
  journal_unavailable,
  count_  // number of reasons; keep last
};

constexpr std::size_t reject_reason_count = static_cast<std::size_t>(RejectReason::count_);

// Stable snake_case name.
std::string_view reject_reason_name(RejectReason r);
// One sentence for the documentation and `rigcal status`.
std::string_view reject_reason_description(RejectReason r);

}  // namespace rigcal::protocol
