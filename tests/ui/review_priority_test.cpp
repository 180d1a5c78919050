// The review queue's ordering rules (ui/review_priority.h), each reason on
// its own and together, on hand-made traps whose answers are worked out from
// the rules' definitions.
#include <QtTest>

#include "ui/review_priority.h"

using namespace budledger;
using namespace budledger::ui;

namespace {

ReviewEvent call(std::int64_t id, int frame, EventKind kind, double confidence,
                 Decision d = Decision::Proposed) {
  ReviewEvent e;
  e.event = {id, 1, 1, frame, kind, confidence};
  e.decision = d;
  return e;
}

std::vector<ReviewItem> run(const std::vector<ReviewEvent>& events,
                            const std::vector<store::MeasurementRecord>& m = {},
                            const std::vector<store::DriftRecord>& drift = {}) {
  TrapReviewInput in{{1, 1}, &events, nullptr, &m, &drift, 10.0};
  return reviewItems(in);
}

const ReviewItem* find(const std::vector<ReviewItem>& items, std::int64_t id) {
  for (const auto& i : items)
    if (i.eventId == id) return &i;
  return nullptr;
}

}  // namespace

class ReviewPriorityTest : public QObject {
  Q_OBJECT

 private slots:
  void confidentWellFormedCallsNeedNobody() {
    // bud 2, separation 12 (100 min later), bud 14, separation 23: all >= 0.9.
    const auto items =
        run({call(1, 2, EventKind::Bud, 0.95), call(2, 12, EventKind::Separation, 0.97),
             call(3, 14, EventKind::Bud, 0.92), call(4, 23, EventKind::Separation, 0.99)});
    QVERIFY(items.empty());
  }

  void lowConfidenceIsOneMinusConfidence() {
    const auto items = run({call(1, 2, EventKind::Bud, 0.6)});
    QCOMPARE(items.size(), size_t(1));
    QCOMPARE(items[0].reasons, unsigned(kLowConfidence));
    QVERIFY(qFuzzyCompare(items[0].need, 0.4));
    QVERIFY(items[0].why.contains(QStringLiteral("60%")));
  }

  void shortIntervalAndMissingBud() {
    // Separations at 10 and 13: 30 min apart (< 45), and no bud before the second.
    const auto items =
        run({call(1, 1, EventKind::Bud, 0.99), call(2, 10, EventKind::Separation, 0.99),
             call(3, 13, EventKind::Separation, 0.99)});
    QCOMPARE(items.size(), size_t(1));
    QCOMPARE(items[0].eventId, std::int64_t(3));
    QCOMPARE(items[0].reasons, unsigned(kShortInterval | kUnpaired));
    QVERIFY(qFuzzyCompare(items[0].need, 1.0));  // 0.6 + 0.4
  }

  void longIntervalIsFlaggedMildly() {
    // 60 frames of 10 min = 10 h between divisions (> 8 h).
    const auto items =
        run({call(1, 1, EventKind::Bud, 0.99), call(2, 10, EventKind::Separation, 0.99),
             call(3, 60, EventKind::Bud, 0.99), call(4, 70, EventKind::Separation, 0.99)});
    QCOMPARE(items.size(), size_t(1));
    QCOMPARE(items[0].reasons, unsigned(kLongInterval));
  }

  void crowdingAndRegistrationNearTheCall() {
    std::vector<store::MeasurementRecord> m(1);
    m[0].frame = 22;
    m[0].occupancy = Occupancy::Crowded;
    std::vector<store::DriftRecord> d{{1, 40, 0, 0, 0.95, 1}, {1, 41, 5, 0, 0.95, 1}};  // 5 px jump
    const auto items = run({call(1, 20, EventKind::Bud, 0.99), call(2, 42, EventKind::Bud, 0.99),
                            call(3, 60, EventKind::Bud, 0.99)},
                           m, d);
    QCOMPARE(items.size(), size_t(2));
    QCOMPARE(find(items, 1)->reasons, unsigned(kCrowding));      // crowded 2 frames away
    QCOMPARE(find(items, 2)->reasons, unsigned(kRegistration));  // jump 1 frame away
    QVERIFY(!find(items, 3));
  }

  void decidedCallsLeaveTheQueueButStillShapeIntervals() {
    // The accepted separation at 10 is the reference for the one at 13.
    const auto items =
        run({call(1, 1, EventKind::Bud, 0.5, Decision::Accepted),
             call(2, 10, EventKind::Separation, 0.5, Decision::Accepted),
             call(3, 12, EventKind::Bud, 0.99), call(4, 13, EventKind::Separation, 0.99)});
    QCOMPARE(items.size(), size_t(1));
    QCOMPARE(items[0].eventId, std::int64_t(4));
    QCOMPARE(items[0].reasons, unsigned(kShortInterval));
    // A rejected call does not count: with separation 10 rejected, 13 has no predecessor.
    const auto rejected = run({call(1, 1, EventKind::Bud, 0.99),
                               call(2, 10, EventKind::Separation, 0.99, Decision::Rejected),
                               call(4, 13, EventKind::Separation, 0.99)});
    QVERIFY(rejected.empty());
  }

  void orderIsNeedThenTrapThenFrame() {
    std::vector<ReviewItem> items{{{1, 2}, 1, 5, EventKind::Bud, 0.5, 0, {}},
                                  {{1, 1}, 2, 9, EventKind::Bud, 0.5, 0, {}},
                                  {{1, 1}, 3, 4, EventKind::Bud, 0.5, 0, {}},
                                  {{1, 3}, 4, 1, EventKind::Bud, 0.9, 0, {}}};
    sortByNeed(items);
    QCOMPARE(items[0].eventId, std::int64_t(4));
    QCOMPARE(items[1].eventId, std::int64_t(3));
    QCOMPARE(items[2].eventId, std::int64_t(2));
    QCOMPARE(items[3].eventId, std::int64_t(1));
  }
};

QTEST_APPLESS_MAIN(ReviewPriorityTest)
#include "review_priority_test.moc"
