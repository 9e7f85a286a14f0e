#pragma once
// Turning a report's sources into its inputs: a CSV pair table, or a channel's journal pairs and its
// configuration (the daemon's own linearisation, certificate, tolerance, range, units and standard).
#include <string>

#include "journal_pairs.hpp"
#include "report_model.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/result.hpp"
#include "rigcal/table/pair_table.hpp"

namespace rigcal::report {

// Pairs, weights, per-pair uncertainties and (parsed) time stamps of a CSV table. Time stamps are
// RFC 3339 UTC or epoch seconds, as the line protocol takes them. Error: a time field that is
// neither, named by source, line and column.
Result<ReportData> data_from_table(const table::PairTable& table, const std::string& source,
                                   const std::string& time_column);

// The journal's raw pairs converted with the channel's linearisations exactly as rigcald converts
// them; pairs whose raw signal is outside the linearisation's range are left out (rigcald rejects
// them too) and counted in a note. Error: the selection straddles an operator reset (as-found and
// as-left data would be mixed), or no pair is left.
Result<ReportData> data_from_journal(const JournalScan& scan, const config::ChannelConfig& channel);

// What rigcald's configuration says about the channel, as report options and labels.
ReportOptions options_from_channel(const config::ChannelConfig& channel);
ReportLabels labels_from_channel(const config::ChannelConfig& channel);

// Notes on how the journal report differs from what the daemon computes (memory policy, screening),
// and on what the scan found (pairs outside the period, damaged frames).
std::vector<std::string> journal_notes(const JournalScan& scan, const config::ChannelConfig& channel);

}  // namespace rigcal::report
