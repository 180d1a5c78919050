#include "core/base/events.h"

#include <gtest/gtest.h>

namespace budledger {
namespace {

TEST(Events, KindNamesRoundTrip) {
  for (EventKind k : kAllEventKinds) EXPECT_EQ(eventKindFromString(toString(k)), k);
  EXPECT_FALSE(eventKindFromString("division").has_value());
  EXPECT_EQ(toString(EventKind::Separation), "separation");
}

TEST(Events, OutcomeCensoring) {
  EXPECT_FALSE(isCensored(Outcome::Death));
  EXPECT_TRUE(isCensored(Outcome::Washout));
  EXPECT_TRUE(isCensored(Outcome::EndOfImaging));
  EXPECT_EQ(outcomeFromString("end-of-imaging"), Outcome::EndOfImaging);
}

}  // namespace
}  // namespace budledger
