// The control socket's request line: the four requests, their words, and refusals that say why.
#include <catch2/catch.hpp>
#include <string>

#include "rigcal/protocol/control_request.hpp"

using namespace rigcal::protocol;

TEST_CASE("control requests parse into a verb and a channel") {
  auto r = parse_control_request("status");
  CHECK(r.ok);
  CHECK(r.verb == ControlVerb::status);
  CHECK(r.channel.empty());
  r = parse_control_request("status TT-101\r\n");
  CHECK((r.ok && r.verb == ControlVerb::status && r.channel == "TT-101"));
  r = parse_control_request("\treset \t PT-204 ");
  CHECK((r.ok && r.verb == ControlVerb::reset && r.channel == "PT-204"));
  CHECK(parse_control_request("metrics").verb == ControlVerb::metrics);
  CHECK(parse_control_request("checkpoint").verb == ControlVerb::checkpoint);
}

TEST_CASE("control requests that are not one of the four are refused with the usage") {
  const std::string usage = "ERR unknown_request expected: status [CHANNEL] | metrics | reset CHANNEL | checkpoint";
  for (const char* bad : {"", "   ", "shutdown", "status TT-101 extra", "metrics now", "checkpoint 3", "STATUS"}) {
    const auto r = parse_control_request(bad);
    CHECK_FALSE(r.ok);
    CHECK(r.error == usage);
  }
  CHECK(parse_control_request("reset").error == "ERR reset name the channel to reset: reset CHANNEL");
  CHECK(parse_control_request(std::string(5000, 'x')).error == "ERR request_too_long at most 4096 bytes");
}

TEST_CASE("control AUTH lines give the secret and nothing else") {
  auto a = parse_control_auth("AUTH s3cret\r\n");
  CHECK((a.ok && a.secret == "s3cret"));
  CHECK_FALSE(parse_control_auth("AUTH ").ok);
  CHECK_FALSE(parse_control_auth("AUTH").ok);
  CHECK_FALSE(parse_control_auth("auth s3cret").ok);
  CHECK_FALSE(parse_control_auth("status").ok);
}
