// The AUTH secret rule shared by rigcald's secret files and rigcal's --secret-file (our protocol's
// own rule: no external source applies).
#include <catch2/catch.hpp>

#include "rigcal/protocol/auth_secret.hpp"

using rigcal::protocol::auth_secret_from_text;

TEST_CASE("a secret file's word is the secret, without surrounding blanks or line ends", "[auth]") {
  auto s = auth_secret_from_text("  ctl-9f2a\r\n", "/etc/rigcal/control.secret");
  REQUIRE(s);
  CHECK(s.value() == "ctl-9f2a");
  CHECK(auth_secret_from_text("\tx\n\n", "f").value() == "x");
}

TEST_CASE("a secret of several words is refused, naming the file, since AUTH could never send it", "[auth]") {
  auto s = auth_secret_from_text("two words\n", "/etc/rigcal/lan.secret");
  REQUIRE_FALSE(s);
  CHECK(s.error().message == "/etc/rigcal/lan.secret: the secret must be one word (AUTH takes a single argument)");
  CHECK_FALSE(auth_secret_from_text("first\nsecond\n", "f"));
}

TEST_CASE("an empty or blank secret file is refused, naming the file", "[auth]") {
  for (const char* text : {"", " \t\r\n"}) {
    auto s = auth_secret_from_text(text, "/etc/rigcal/lan.secret");
    REQUIRE_FALSE(s);
    CHECK(s.error().message == "/etc/rigcal/lan.secret: the secret file is empty");
  }
}
