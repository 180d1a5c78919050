#include "core/store/journal.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include "core/store/editor.h"
#include "core/store/lifespans.h"
#include "core/store/materialised.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

JournalEntry sample() {
  JournalEntry e;
  e.seq = 7;
  e.utc = "2026-01-02T03:04:05.678Z";
  e.actor = "tech01";
  e.role = "technician";
  e.action = JournalAction::Accept;
  e.target = "event:9";
  e.before = stateJson(EventState{1, 4, 12, EventKind::Bud, EventStatus::Proposed});
  e.after = stateJson(EventState{1, 4, 12, EventKind::Bud, EventStatus::Accepted});
  e.reason = "clear bud";
  e.prevHash = kGenesisHash;
  return e;
}

TEST(Journal, CanonicalTextIsTheDocumentedForm) {
  // The form in docs/project-file.md ("Journal canonical form"), written out by hand.
  const std::string expected =
      "budledger-journal-entry/1\n"
      "seq=1:7\n"
      "utc=24:2026-01-02T03:04:05.678Z\n"
      "actor=6:tech01\n"
      "role=10:technician\n"
      "action=6:accept\n"
      "target=7:event:9\n"
      "before=67:{\"frame\":12,\"kind\":\"bud\",\"position\":1,\"status\":\"proposed\",\"trap\":4}"
      "\n"
      "after=67:{\"frame\":12,\"kind\":\"bud\",\"position\":1,\"status\":\"accepted\",\"trap\":4}\n"
      "reason=9:clear bud\n"
      "origin=0:\n"
      "prev_hash=64:" +
      kGenesisHash + "\n";
  EXPECT_EQ(canonicalText(sample()), expected);
  // Check value: GNU coreutils `sha256sum` over the same text written with printf.
  EXPECT_EQ(entryHash(sample()),
            "aae2e367e001d578a61b508fc20119c7e7097ec79a84c45064166fc5b34686ec");
}

TEST(Journal, EveryColumnButTheHashIsCovered) {
  const auto h = entryHash(sample());
  auto changed = [&](auto mutate) {
    auto e = sample();
    mutate(e);
    return entryHash(e) != h;
  };
  EXPECT_TRUE(changed([](JournalEntry& e) { e.seq = 8; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.utc[22] = '9'; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.actor = "tech02"; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.role = "pi"; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.action = JournalAction::Delete; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.target = "event:10"; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.before = "null"; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.after = "null"; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.reason = ""; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.origin = "a.budledger#1:x"; }));
  EXPECT_TRUE(changed([](JournalEntry& e) { e.prevHash[0] = '1'; }));
  // Length prefixes: moving text from one field to the next changes the hash.
  EXPECT_TRUE(changed([](JournalEntry& e) {
    e.actor = "tech0";
    e.role = "1technician";
  }));
}

TEST(Journal, TargetsRoundTrip) {
  for (const auto& t : {Target::event(12), Target::event(-40), Target::tenure(1, 4, 0),
                        Target::trapOf(1, 4), Target::positionOf(3), Target::experiment(),
                        Target::entry(17), Target::signOff(23), Target::run(2)}) {
    const auto back = parseTarget(toString(t));
    ASSERT_TRUE(back) << toString(t);
    EXPECT_EQ(*back, t) << toString(t);
  }
  EXPECT_FALSE(parseTarget("event:"));
  EXPECT_FALSE(parseTarget("trap:1"));
  EXPECT_FALSE(parseTarget("tenure:1/2/x"));
  EXPECT_FALSE(parseTarget("bogus:1"));
}

TEST(Journal, EntriesChainAndCannotBeChangedOrDeleted) {
  const auto dir = testing::scratchDir("journal_chain");
  {
    auto p = Project::create((dir / "p.budledger").string());
    const auto fx = testing::makeFixture(p);
    Editor ed(p);
    for (const auto& e : currentEvents(p.db(), fx.positions[0]))
      ed.accept(testing::kTech, e.event.id);
    const auto entries = readJournal(p.db());
    ASSERT_GT(entries.size(), 5u);
    std::string prev = kGenesisHash;
    for (std::size_t i = 0; i < entries.size(); ++i) {
      EXPECT_EQ(entries[i].seq, static_cast<std::int64_t>(i + 1));
      EXPECT_EQ(entries[i].prevHash, prev);
      EXPECT_EQ(entries[i].hash, entryHash(entries[i]));
      prev = entries[i].hash;
    }
    EXPECT_EQ(p.meta("journal_head"), fmt::format("{}:{}", entries.back().seq, prev));
    EXPECT_THROW(p.db().exec("UPDATE journal SET reason = 'x' WHERE seq = 2"), StoreError);
    EXPECT_THROW(p.db().exec("DELETE FROM journal WHERE seq = 2"), StoreError);
  }
  std::filesystem::remove_all(dir);
}

TEST(Journal, LifespansCanonicalTextAndDigest) {
  // Tenure of the lineage tests' first case: bud 3, separation 9, bud 12,
  // separation 18, death 40.
  lineage::Tenure t;
  t.position = 1;
  t.trap = 4;
  t.firstFrame = 0;
  t.lastFrame = 40;
  t.divisions = 2;
  t.outcome = Outcome::Death;
  t.separationFrames = {9, 18};
  t.budFrames = {3, 12};
  const std::map<int, std::string> names{{1, "pos01"}};
  EXPECT_EQ(
      lifespansCanonicalText({t}, names, "trap:pos01/4"),
      "budledger-lifespans/1\nscope=trap:pos01/4\npos01\t4\t0\t0\t40\t2\tdeath\t9,18\t3,12\n");
  // Check value: GNU coreutils `sha256sum` over the same text written with printf.
  EXPECT_EQ(lifespansDigest({t}, names, "trap:pos01/4"),
            "7151f84f3948871255e643cd5342ba8a6d2d4a0f4e488d00b7ed4f3d4e5fc657");
}

}  // namespace
}  // namespace budledger::store
