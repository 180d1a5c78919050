// Live results: the results panel shows the current trap's tenures as
// core/lineage counts them, and the survival model's curves equal those
// core/stats computes from scratch over every tenure of the project.
#include <QTemporaryDir>
#include <QTreeWidget>
#include <QtTest>

#include "core/stats/kaplan_meier.h"
#include "core/store/project.h"
#include "demo_project.h"
#include "ui/results_panel.h"
#include "ui/review_session.h"
#include "ui/survival_model.h"

using namespace budledger;

class ResultsTest : public QObject {
  Q_OBJECT

 private slots:
  void initTestCase() {
    path_ = dir_.filePath(QStringLiteral("r.budledger"));
    testsupport::DemoOptions o;
    o.positions = 3;
    o.rows = 2;
    o.cols = 4;
    o.frames = 150;
    testsupport::writeDemoProject(path_, o);
  }

  void panelListsTheTrapsTenures() {
    ui::ReviewSession session(path_, store::Database::Access::ReadOnly);
    ui::ResultsPanel panel;
    panel.setSession(&session);
    const ui::TrapId trap = session.allTraps().at(3);  // the demo's late-arrival trap
    panel.showTrap(trap);
    const auto& tenures = session.tenures(trap);
    QVERIFY(!tenures.empty());
    QCOMPARE(panel.table()->topLevelItemCount(), static_cast<int>(tenures.size()));
    QCOMPARE(panel.table()->topLevelItem(0)->text(3), QString::number(tenures[0].divisions));
    QCOMPARE(panel.table()->topLevelItem(0)->text(1),
             QStringLiteral("%1–%2").arg(tenures[0].firstFrame).arg(tenures[0].lastFrame));
    panel.showTrap(std::nullopt);
    QCOMPARE(panel.table()->topLevelItemCount(), 0);
  }

  void survivalCurvesEqualAFreshComputation() {
    ui::ReviewSession session(path_, store::Database::Access::ReadOnly);
    ui::SurvivalModel model;
    model.setSession(&session);
    std::vector<stats::Lifespan> all;
    for (const ui::TrapId t : session.allTraps())
      for (const auto& ten : session.tenures(t))
        all.push_back({ten.divisions,
                       ten.outcome == Outcome::Death,
                       session.position(t.position)->group,
                       {}});
    const auto fresh = stats::kaplanMeierByGroup(stats::Cohort(all));
    QCOMPARE(model.curves().size(), fresh.size());
    QCOMPARE(model.curves().size(), size_t(3));  // three groups in the demo
    for (size_t g = 0; g < fresh.size(); ++g) {
      const auto expect = ui::SurvivalModel::fromStats(fresh[g]);
      const auto& got = model.curves()[g];
      QCOMPARE(got.label, expect.label);
      QCOMPARE(got.subjects, expect.subjects);
      QCOMPARE(got.steps.size(), expect.steps.size());
      for (size_t i = 0; i < got.steps.size(); ++i) {
        QCOMPARE(got.steps[i].x, expect.steps[i].x);
        QCOMPARE(got.steps[i].survival, expect.steps[i].survival);
      }
    }
    QVERIFY(model.comparison().contains(QStringLiteral("log-rank")));
    QCOMPARE(model.mothers(), static_cast<long>(all.size()));
  }

  void stepsStartAtOneAndOnlyFallAtDeaths() {
    stats::Cohort cohort(
        std::vector<stats::Lifespan>{{5, true, "g", {}}, {8, false, "g", {}}, {10, true, "g", {}}});
    const auto curve = ui::SurvivalModel::fromStats(stats::kaplanMeierByGroup(cohort).at(0));
    // KM by hand: 3 at risk, death at 5 -> 2/3; censor at 8; 1 at risk, death at 10 -> 0.
    QCOMPARE(curve.steps.size(), size_t(3));
    QCOMPARE(curve.steps[0].survival, 1.0);
    QCOMPARE(curve.steps[1].x, 5.0);
    QVERIFY(qFuzzyCompare(curve.steps[1].survival, 2.0 / 3.0));
    QCOMPARE(curve.steps[2].x, 10.0);
    QCOMPARE(curve.steps[2].survival, 0.0);
    QCOMPARE(curve.censored.size(), size_t(1));
    QCOMPARE(curve.censored[0].x, 8.0);
    QVERIFY(curve.median.has_value());  // S falls below 0.5 at 10
    QCOMPARE(*curve.median, 10.0);
  }

  // A project grown by one analysis per position holds one engine run per
  // analysis; each position's events, measurements and review flags come from
  // the run that analysed it, not only from the newest run.
  void eachPositionReadsTheRunThatAnalysedIt() {
    const QString path = dir_.filePath(QStringLiteral("grown.budledger"));
    {
      auto project = store::Project::create(path.toStdString());
      for (int i = 1; i <= 2; ++i) {
        const int pid = project.addPosition({0, "pos" + std::to_string(i), "g", 20, 64, 64});
        project.replaceTraps(pid, {{pid, 0, 0, 0, 32.0, 32.0, false}});
        const std::string params = R"({"positions":[{"position":)" + std::to_string(pid) +
                                   R"(,"trap_flags":[{"trap":0,"reason":"crowded-throughout"}]}]})";
        const store::EngineRun run{0, store::utcNowIso(), "test", params, "none"};
        store::RunRecording recording;
        recording.positions = {pid};
        const auto id = project.addEngineRun(
            run, {{0, pid, 0, 5, EventKind::Bud, 0.9}, {0, pid, 0, 9, EventKind::Separation, 0.9}},
            recording);
        store::MeasurementRecord m;
        m.position = pid;
        m.frame = 5;
        m.occupancy = Occupancy::Budded;
        m.cellCount = 2;
        project.addMeasurements(id, {m});
      }
    }
    ui::ReviewSession session(path, store::Database::Access::ReadOnly);
    for (int pid = 1; pid <= 2; ++pid) {
      const ui::TrapId trap{pid, 0};
      QCOMPARE(session.events(trap).size(), size_t(2));
      QCOMPARE(session.measurements(trap).size(), size_t(1));
      QCOMPARE(session.engineFlags(trap),
               std::vector<QString>{QStringLiteral("crowded-throughout")});
    }
  }

 private:
  QTemporaryDir dir_;
  QString path_;
};

QTEST_MAIN(ResultsTest)
#include "results_test.moc"
