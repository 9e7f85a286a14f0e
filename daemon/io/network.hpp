#pragma once
// Peer allow-lists (CIDR) and endpoint text for messages.
#include <boost/asio/ip/address.hpp>
#include <string>
#include <vector>

#include "rigcal/config/config.hpp"

namespace rigcal::io {

// True if `allow` is empty or some network contains `peer` (IPv4-mapped IPv6 peers match IPv4 networks).
bool peer_allowed(const boost::asio::ip::address& peer, const std::vector<config::Network>& allow);

template <class Endpoint>
std::string endpoint_text(const Endpoint& e) {
  const auto a = e.address();
  return (a.is_v6() ? "[" + a.to_string() + "]" : a.to_string()) + ":" + std::to_string(e.port());
}

}  // namespace rigcal::io
