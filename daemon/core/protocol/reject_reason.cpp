#include "rigcal/protocol/reject_reason.hpp"

namespace rigcal::protocol {

namespace {
struct ReasonText {
  std::string_view name;
  std::string_view description;
};
constexpr ReasonText reasons[] = {
    {"line_too_long", "the line is longer than the input's max_line_bytes"},
    {"bad_utf8", "the line is not valid UTF-8"},
    {"control_character", "the line contains a control character other than tab"},
    {"unknown_record_type", "the first field is not P, R, HELLO or AUTH"},
    {"missing_field", "the record has fewer fields than its type needs"},
    {"extra_field", "the record has more fields than its type allows"},
    {"bad_sequence", "the @ sequence number is not an integer from 1 to 2^63-1"},
    {"missing_sequence", "a record on a stream named by HELLO carries no @ sequence number"},
    {"bad_timestamp", "the time field is not RFC 3339 UTC, epoch seconds or '-'"},
    {"bad_number", "a value field is not a decimal number"},
    {"not_finite", "a value field is NaN or infinite"},
    {"bad_channel_name", "the channel field has characters or a length a channel id cannot have"},
    {"unknown_channel", "no channel with this id is configured"},
    {"not_authenticated", "the listener requires AUTH before any other line"},
    {"unexpected_command", "HELLO or AUTH sent twice, too late, or where not allowed"},
    {"clock_future", "the timestamp is further ahead of rigcald's clock than time.max_future_s"},
    {"clock_backwards", "the timestamp is older than the channel's latest by more than time.max_backwards_s"},
    {"out_of_signal_range", "the raw signal is outside the range its linearisation accepts"},
    {"outlier", "an isolated pair far from the current fit (outlier screening), kept out of the fit"},
    {"journal_unavailable", "the journal cannot be written, so the record cannot be accepted"},
};
static_assert(sizeof(reasons) / sizeof(reasons[0]) == reject_reason_count);
}  // namespace

std::string_view reject_reason_name(RejectReason r) { return reasons[static_cast<std::size_t>(r)].name; }
std::string_view reject_reason_description(RejectReason r) {
  return reasons[static_cast<std::size_t>(r)].description;
}

}  // namespace rigcal::protocol
