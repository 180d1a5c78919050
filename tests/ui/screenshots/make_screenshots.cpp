// ui-screenshots OUTDIR [SUFFIX]: renders the workstation's main views with
// QWidget::grab for the user guide. It writes a made-up project (test
// support), opens it in the real MainWindow with synthetic crops, drives it
// with the same commands the keys run, and saves one PNG per view. Run it
// through docs/screenshots/make-screenshots.sh (100% and 200% scale). The
// new-project views use stacks the simulator writes (demo/scenarios/tiny.json).
#include <QApplication>
#include <QDir>
#include <QDockWidget>
#include <QEventLoop>
#include <QFile>
#include <QScreen>
#include <QSettings>
#include <QTableWidget>
#include <QTemporaryDir>
#include <QTimer>
#include <cstdio>
#include <filesystem>

#include "core/store/project.h"
#include "demo/scenario.h"
#include "demo/simulator.h"
#include "demo_project.h"
#include "synthetic_crops.h"
#include "ui/analysis_dialog.h"
#include "ui/audit_trail_panel.h"
#include "ui/identity.h"
#include "ui/main_window.h"
#include "ui/new_project_dialog.h"
#include "ui/review_queue_panel.h"
#include "ui/shortcuts_dialog.h"
#include "ui/sign_off_dialog.h"
#include "ui/strip_workspace.h"
#include "ui/survival_plot.h"
#include "ui/time_strip_view.h"
#include "ui/trap_image_view.h"

using namespace budledger;

namespace {

QString gSuffix;  // "" at 100%, "@2x" at 200%

bool save(QWidget* w, const QString& dir, const QString& name) {
  const QString path = QDir(dir).filePath(name + gSuffix + QStringLiteral(".png"));
  const bool ok = w->grab().save(path, "PNG");
  std::fprintf(ok ? stdout : stderr, "%s %s\n", ok ? "wrote" : "cannot write",
               path.toLocal8Bit().constData());
  return ok;
}

void settle() {
  for (int i = 0; i < 5; ++i) QApplication::processEvents();
}

}  // namespace

int main(int argc, char** argv) {
  QApplication app(argc, argv);
  if (argc < 2) {
    std::fprintf(stderr, "usage: ui-screenshots OUTDIR [SUFFIX]\n");
    return 2;
  }
  const QString out = QString::fromLocal8Bit(argv[1]);
  if (argc > 2) gSuffix = QString::fromLocal8Bit(argv[2]);
  QDir().mkpath(out);
  QFile style(QStringLiteral(":/style/workstation.qss"));
  if (style.open(QIODevice::ReadOnly)) app.setStyleSheet(QString::fromUtf8(style.readAll()));

  QTemporaryDir tmp;
  const QString project = tmp.filePath(QStringLiteral("demo.budledger"));
  testsupport::DemoOptions demo;
  demo.positions = 2;
  demo.rows = 4;
  demo.cols = 6;
  demo.frames = 240;
  const auto events = testsupport::writeDemoProject(project, demo);
  auto crops = std::make_shared<testsupport::SyntheticCrops>(events);

  QSettings settings(tmp.filePath(QStringLiteral("settings.ini")), QSettings::IniFormat);
  ui::MainWindowOptions options;
  options.cropSources = [crops](ui::ReviewSession&) { return crops; };
  ui::MainWindow w(settings, options);
  w.resize(1600, 1000);
  w.show();
  if (auto err = w.openProject(project, true)) {
    std::fprintf(stderr, "cannot open demo project: %s\n", err->toLocal8Bit().constData());
    return 1;
  }
  ui::TimeStripView* strips = w.strips();
  auto waitImages = [&] {
    for (int i = 0; i < 4; ++i) {
      settle();
      strips->viewport()->repaint();
      w.trapImage()->repaint();
      if (w.loader()) w.loader()->waitForIdle();
    }
    settle();
  };
  bool ok = true;

  // 1. The workstation with crops at full size, cursor on an event.
  w.run(ui::Command::ZoomCrops);
  strips->setCursor(1, 30);
  w.run(ui::Command::NextEvent);
  waitImages();
  ok &= save(&w, out, QStringLiteral("workstation"));

  // 2. The compact kymograph view: the whole movie at once.
  w.run(ui::Command::ZoomFit);
  strips->setCursor(2, 120);
  waitImages();
  ok &= save(w.workspace(), out, QStringLiteral("strips-compact"));

  // 3. Crops zoomed in on a few frames.
  w.run(ui::Command::ZoomCrops);
  w.run(ui::Command::ZoomIn);
  strips->setCursor(0, 40);
  w.run(ui::Command::NextEvent);
  waitImages();
  ok &= save(w.workspace(), out, QStringLiteral("strips-crops"));

  // 4. The review queue and the large trap view after walking the queue.
  w.queuePanel()->parentWidget()->raise();  // its dock shares a tab with the trap list
  w.run(ui::Command::NextQueueItem);
  waitImages();
  ok &= save(w.queuePanel(), out, QStringLiteral("review-queue"));
  ok &= save(w.trapImage(), out, QStringLiteral("trap-view"));

  // 5. Keyboard shortcuts dialog.
  ui::ShortcutsDialog keys(w.keyMap(), &w);
  keys.show();
  settle();
  ok &= save(&keys, out, QStringLiteral("shortcuts"));
  keys.hide();

  // 6. The audit trail after a few edits, and the sign-off dialog for a PI.
  settings.setValue(QStringLiteral("identity/name"), QStringLiteral("Tess Tech"));
  settings.setValue(QStringLiteral("identity/role"), QStringLiteral("technician"));
  w.run(ui::Command::ZoomCrops);
  strips->setCursor(0, 0);
  for (ui::Command c : {ui::Command::NextEvent, ui::Command::Accept, ui::Command::NextEvent,
                        ui::Command::MoveLater, ui::Command::NextEvent, ui::Command::Reject})
    w.run(c);
  settle();
  {
    // The dock's panel on its own, at the width it gets docked under the strips.
    ui::AuditTrailPanel audit;
    audit.setDatabase(&w.session()->project().db());
    audit.resize(1200, 300);
    audit.show();
    settle();
    ok &= save(&audit, out, QStringLiteral("audit-trail"));
  }
  {
    ui::SignOffDialog sign(*w.session(),
                           {QStringLiteral("Petra Principal"), ui::Identity::piRole()},
                           strips->currentTrap(), &w);
    sign.show();
    settle();
    ok &= save(&sign, out, QStringLiteral("sign-off"));
  }

  // 7. New project from images: the dialog over simulated stacks, then the
  //    analysis under way.
  const std::filesystem::path images = tmp.filePath(QStringLiteral("images")).toStdString();
  demo::simulateExperiment(
      demo::loadScenario(std::filesystem::path(BUDLEDGER_SOURCE_DIR) / "demo/scenarios/tiny.json"),
      images);
  QStringList stacks;
  for (const auto& e : std::filesystem::directory_iterator(images))
    if (e.path().extension() == ".tif") stacks << QString::fromStdString(e.path().string());
  stacks.sort();
  {
    ui::NewProjectDialog np(&w);
    if (auto err = np.addStacks(stacks)) {
      std::fprintf(stderr, "cannot add stacks: %s\n", err->toLocal8Bit().constData());
      return 1;
    }
    np.setGroup(0, QStringLiteral("wt"), QStringLiteral("2% glucose"));
    np.setGroup(1, QStringLiteral("mut-a"), QStringLiteral("2% glucose"));
    np.setTarget(tmp.filePath(QStringLiteral("week-12.budledger")));
    np.show();
    settle();
    ok &= save(&np, out, QStringLiteral("new-project"));
    auto plan = np.plan();
    plan.digests = false;
    ui::AnalysisDialog run(plan, &w);
    run.show();
    bool shot = false;
    QObject::connect(&run, &ui::AnalysisDialog::progressed, &run,
                     [&](const QString& stage, double f) {
                       if (!shot && stage.contains(QStringLiteral("(1/2)")) && f > 0.3) {
                         shot = true;
                         ok &= save(&run, out, QStringLiteral("analysis"));
                         run.cancel();
                       }
                     });
    QEventLoop loop;
    QObject::connect(&run, &ui::AnalysisDialog::cancelled, &loop, &QEventLoop::quit);
    QObject::connect(&run, &ui::AnalysisDialog::finished, &loop, &QEventLoop::quit);
    QObject::connect(&run, &ui::AnalysisDialog::failed, &loop, &QEventLoop::quit);
    run.start();
    loop.exec();
    ok &= shot;
  }

  // 8. A project held by another program: read-only, with the banner.
  {
    const QString held = tmp.filePath(QStringLiteral("held.budledger"));
    testsupport::writeDemoProject(held, demo);
    auto holder = store::Project::open(held.toStdString());
    w.openProject(held, true);
    w.run(ui::Command::ZoomFit);
    waitImages();
    ok &= save(&w, out, QStringLiteral("read-only"));
  }
  return ok ? 0 : 1;
}
