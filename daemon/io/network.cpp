#include "network.hpp"

#include <cstring>

namespace rigcal::io {

namespace {
bool in_network(const unsigned char* addr, const config::Network& n) {
  const int full = n.prefix / 8, rest = n.prefix % 8;
  if (std::memcmp(addr, n.bytes, static_cast<std::size_t>(full)) != 0) return false;
  if (rest == 0) return true;
  const unsigned char mask = static_cast<unsigned char>(0xFF << (8 - rest));
  return (addr[full] & mask) == (n.bytes[full] & mask);
}
}  // namespace

bool peer_allowed(const boost::asio::ip::address& peer, const std::vector<config::Network>& allow) {
  if (allow.empty()) return true;
  boost::asio::ip::address a = peer;
  if (a.is_v6() && a.to_v6().is_v4_mapped()) a = boost::asio::ip::make_address_v4(boost::asio::ip::v4_mapped, a.to_v6());
  for (const auto& n : allow) {
    if (a.is_v4() && !n.v6) {
      const auto b = a.to_v4().to_bytes();
      if (in_network(b.data(), n)) return true;
    } else if (a.is_v6() && n.v6) {
      const auto b = a.to_v6().to_bytes();
      if (in_network(b.data(), n)) return true;
    }
  }
  return false;
}

}  // namespace rigcal::io
