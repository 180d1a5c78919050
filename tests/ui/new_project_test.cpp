// File → New project from images on the real widgets: the simulator writes a
// tiny two-position experiment as OME-TIFF stacks; the dialog opens them,
// fills interval and pixel size from their metadata, takes a strain and a
// condition per position; the analysis runs in the background and the
// project opens in the window when done. Cancelling mid-way and a failing
// input both leave no file behind, and a failure is a dialog naming the cause.
#include <QApplication>
#include <QDir>
#include <QDoubleSpinBox>
#include <QFile>
#include <QMessageBox>
#include <QPushButton>
#include <QSettings>
#include <QSignalSpy>
#include <QTableWidget>
#include <QTemporaryDir>
#include <QTimer>
#include <QtTest>
#include <filesystem>
#include <fstream>

#include "demo/scenario.h"
#include "demo/simulator.h"
#include "ui/analysis_dialog.h"
#include "ui/main_window.h"
#include "ui/new_project_dialog.h"

using namespace budledger;

namespace {

// Closes the next message box that appears and keeps its text.
class MessageCatcher : public QObject {
 public:
  explicit MessageCatcher(QObject* parent) : QObject(parent) {
    connect(&timer_, &QTimer::timeout, this, [this] {
      if (auto* box = qobject_cast<QMessageBox*>(QApplication::activeModalWidget())) {
        title = box->windowTitle();
        text = box->text();
        box->accept();
      }
    });
    timer_.start(20);
  }
  QString title, text;

 private:
  QTimer timer_;
};

// The simulator's own record of what it wrote: positions.csv
// (position,group,file,frames,interval_min,pixel_um).
struct SimulatedPosition {
  QString name, file;
  double intervalMin = 0, pixelUm = 0;
};

std::vector<SimulatedPosition> readPositionsCsv(const QString& path) {
  std::vector<SimulatedPosition> out;
  QFile f(path);
  if (!f.open(QIODevice::ReadOnly)) return out;
  f.readLine();  // header
  while (!f.atEnd()) {
    const QStringList c = QString::fromUtf8(f.readLine()).trimmed().split(QLatin1Char(','));
    if (c.size() < 6) continue;
    out.push_back({c[0], c[2], c[4].toDouble(), c[5].toDouble()});
  }
  return out;
}

// Every file in a folder, hidden ones (the partial project) included.
QStringList filesIn(const QString& dir) {
  return QDir(dir).entryList(QDir::Files | QDir::Hidden | QDir::NoDotAndDotDot);
}

}  // namespace

class NewProjectTest : public QObject {
  Q_OBJECT

 private slots:
  void initTestCase() {
    QVERIFY(dir_.isValid());
    const std::filesystem::path root = dir_.path().toStdString();
    auto scenario = demo::loadScenario(std::filesystem::path(BUDLEDGER_SOURCE_DIR) /
                                       "demo/scenarios/tiny.json");
    demo::simulateExperiment(scenario, root / "images");
    images_ = dir_.filePath(QStringLiteral("images"));
    sim_ = readPositionsCsv(images_ + QStringLiteral("/positions.csv"));
    QCOMPARE(sim_.size(), size_t{2});
    for (const auto& p : sim_) stacks_ << QDir(images_).filePath(p.file);
    settings_ =
        std::make_unique<QSettings>(dir_.filePath(QStringLiteral("s.ini")), QSettings::IniFormat);
  }

  void dialogReadsMetadataAndTakesGroups() {
    ui::NewProjectDialog d;
    QVERIFY(!d.analyseButton()->isEnabled());
    QVERIFY(!d.addStacks(stacks_).has_value());
    QCOMPARE(d.positionCount(), 2);
    QCOMPARE(d.table()->item(0, ui::NewProjectDialog::kPosition)->text(), sim_[0].name);
    // The simulator's own record of interval and pixel size.
    QVERIFY(d.intervalMinutes());
    QCOMPARE(*d.intervalMinutes(), sim_[0].intervalMin);
    QVERIFY(d.pixelUm());
    QCOMPARE(*d.pixelUm(), sim_[0].pixelUm);
    QVERIFY(d.metadataNote().contains(sim_[0].name));
    QVERIFY(d.target().endsWith(QStringLiteral("images.budledger")));
    QVERIFY(d.analyseButton()->isEnabled());
    // Typing into the table's cells sets the groups.
    d.table()->item(0, ui::NewProjectDialog::kStrain)->setText(QStringLiteral("wt"));
    d.table()->item(0, ui::NewProjectDialog::kCondition)->setText(QStringLiteral("2% glucose"));
    d.table()->item(1, ui::NewProjectDialog::kStrain)->setText(QStringLiteral("mut-a"));
    const auto plan = d.plan();
    QCOMPARE(plan.positions[0].group(), std::string("wt / 2% glucose"));
    QCOMPARE(plan.positions[1].group(), std::string("mut-a"));
    // A typed value wins over the metadata.
    d.findChild<QDoubleSpinBox*>(QStringLiteral("intervalMinutes"))->setValue(7.5);
    QCOMPARE(*d.plan().intervalMin, 7.5);
    QCOMPARE(*d.plan().pixelUm, sim_[0].pixelUm);
  }

  void badAndDuplicateInputsAreRefusedByName() {
    ui::NewProjectDialog d;
    QVERIFY(!d.addStacks({stacks_[0]}).has_value());
    const auto twice = d.addStacks({stacks_[0]});
    QVERIFY(twice.has_value());
    QVERIFY2(twice->contains(sim_[0].name), qPrintable(*twice));
    const QString notTiff = QString::fromUtf8(BUDLEDGER_SOURCE_DIR) + QStringLiteral("/LICENSE");
    const auto bad = d.addStacks({notTiff});
    QVERIFY(bad.has_value());
    QVERIFY2(bad->contains(QStringLiteral("LICENSE")), qPrintable(*bad));
    QCOMPARE(d.positionCount(), 1);
    const auto noFolder = d.addFolder(dir_.filePath(QStringLiteral("no-such-folder")));
    QVERIFY(noFolder.has_value());
    QVERIFY2(noFolder->contains(QStringLiteral("no-such-folder")), qPrintable(*noFolder));
    QCOMPARE(d.positionCount(), 1);
  }

  void analysisRunsInTheBackgroundAndOpensTheProject() {
    ui::NewProjectDialog d;
    QVERIFY(!d.addStacks(stacks_).has_value());
    d.setGroup(0, QStringLiteral("wt"), QStringLiteral("2% glucose"));
    d.setGroup(1, QStringLiteral("mut-a"), QStringLiteral("2% glucose"));
    const QString target = dir_.filePath(QStringLiteral("built/new.budledger"));
    QDir().mkpath(dir_.filePath(QStringLiteral("built")));
    d.setTarget(target);
    auto plan = d.plan();
    plan.digests = false;

    ui::MainWindow w(*settings_);
    w.show();
    auto* dialog = w.analyseAndOpen(plan);
    QVERIFY(dialog->isVisible());
    QVERIFY(dialog->running());
    QSignalSpy progressed(dialog, &ui::AnalysisDialog::progressed);
    // The UI thread stays free: progress arrives through the event loop.
    QTRY_VERIFY_WITH_TIMEOUT(progressed.count() > 3, 60000);
    QTRY_VERIFY_WITH_TIMEOUT(w.hasProject(), 120000);
    QVERIFY(QFileInfo::exists(target));
    QCOMPARE(w.session()->positions().size(), size_t{2});
    QCOMPARE(w.session()->positions()[0].group, std::string("wt / 2% glucose"));
    QCOMPARE(w.session()->positions()[1].group, std::string("mut-a / 2% glucose"));
    QVERIFY(!w.session()->allTraps().empty());
    size_t events = 0;
    for (const auto& t : w.session()->allTraps()) events += w.session()->events(t).size();
    QVERIFY2(events > 0, "the engine proposed nothing");
    QVERIFY(!w.session()->readOnly());
    QVERIFY(w.windowTitle().contains(QStringLiteral("new.budledger")));
    // No partial file is left beside it.
    for (const QString& f : filesIn(dir_.filePath(QStringLiteral("built"))))
      QVERIFY2(f.startsWith(QStringLiteral("new.budledger")), qPrintable(f));
  }

  void cancelMidwayLeavesNothing() {
    const QString folder = dir_.filePath(QStringLiteral("cancelled"));
    QDir().mkpath(folder);
    ui::NewProjectDialog d;
    QVERIFY(!d.addStacks(stacks_).has_value());
    d.setTarget(folder + QStringLiteral("/c.budledger"));
    auto plan = d.plan();
    plan.digests = false;
    ui::MainWindow w(*settings_);
    w.show();
    auto* dialog = w.analyseAndOpen(plan);
    QSignalSpy cancelled(dialog, &ui::AnalysisDialog::cancelled);
    // Cancel once the second position is under way: the first is already in
    // the partial file and must go with it.
    bool clicked = false;
    connect(dialog, &ui::AnalysisDialog::progressed, this, [&](const QString& stage, double) {
      if (!clicked && stage.contains(QStringLiteral("(2/2)"))) {
        clicked = true;
        QTest::mouseClick(dialog->cancelButton(), Qt::LeftButton);
      }
    });
    QTRY_COMPARE_WITH_TIMEOUT(cancelled.count(), 1, 120000);
    QVERIFY(clicked);
    QVERIFY(!w.hasProject());
    QVERIFY2(filesIn(folder).isEmpty(), qPrintable(filesIn(folder).join(QLatin1Char(' '))));
  }

  void aFailingInputIsADialogNamingIt() {
    const QString folder = dir_.filePath(QStringLiteral("failed"));
    QDir().mkpath(folder);
    // A stack cut short after it was chosen: the analysis meets a broken file.
    const QString copy = folder + QStringLiteral("/pos-cut.tif");
    QVERIFY(QFile::copy(stacks_[0], copy));
    ui::NewProjectDialog d;
    QVERIFY(!d.addStacks({copy}).has_value());
    d.setTarget(folder + QStringLiteral("/f.budledger"));
    auto plan = d.plan();
    plan.digests = false;
    {
      QFile f(copy);
      QVERIFY(f.open(QIODevice::ReadWrite));
      QVERIFY(f.resize(f.size() / 3));
    }
    ui::MainWindow w(*settings_);
    w.show();
    MessageCatcher catcher(this);
    auto* dialog = w.analyseAndOpen(plan);
    QSignalSpy failed(dialog, &ui::AnalysisDialog::failed);
    QTRY_COMPARE_WITH_TIMEOUT(failed.count(), 1, 120000);
    QTRY_VERIFY(!catcher.text.isEmpty());
    QCOMPARE(catcher.title, QStringLiteral("Analysis failed"));
    QVERIFY2(catcher.text.contains(QStringLiteral("pos-cut.tif")), qPrintable(catcher.text));
    QVERIFY(!w.hasProject());
    QCOMPARE(filesIn(folder), QStringList{QStringLiteral("pos-cut.tif")});
  }

  void openingAMissingProjectIsADialogNamingIt() {
    ui::MainWindow w(*settings_);
    w.show();
    MessageCatcher catcher(this);
    const QString missing = dir_.filePath(QStringLiteral("gone.budledger"));
    QTimer::singleShot(0, &w, [&] { w.openProject(missing); });
    QTRY_VERIFY(!catcher.text.isEmpty());
    QCOMPARE(catcher.title, QStringLiteral("Cannot open project"));
    QVERIFY2(catcher.text.contains(QStringLiteral("gone.budledger")), qPrintable(catcher.text));
    QVERIFY(!w.hasProject());
  }

 private:
  QTemporaryDir dir_;
  QString images_;
  QStringList stacks_;
  std::vector<SimulatedPosition> sim_;
  std::unique_ptr<QSettings> settings_;
};

QTEST_MAIN(NewProjectTest)
#include "new_project_test.moc"
