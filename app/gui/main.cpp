// budledger: the workstation's entry point. Parses the command line before Qt
// starts (so --help works without a display), falls back to a printed summary
// when there is no display, and supports --screenshot for docs and tests.
#include <fmt/format.h>
#include <CLI/CLI.hpp>

#include <QApplication>
#include <QFile>
#include <QPixmap>
#include <QSettings>
#include <QTimer>
#include <cstdlib>
#include <string>

#include "budledger/version.h"
#include "core/export/summary.h"
#include "core/store/project.h"
#include "ui/main_window.h"
#include "ui/project_crop_source.h"

namespace {

bool hasDisplay() {
  auto set = [](const char* name) {
    const char* v = std::getenv(name);
    return v && *v;
  };
  return set("QT_QPA_PLATFORM") || set("DISPLAY") || set("WAYLAND_DISPLAY");
}

int printHeadlessSummary(const std::string& projectPath) {
  fmt::print("budledger: no display; printing a summary instead of opening the window\n");
  if (projectPath.empty()) {
    fmt::print("(no project given)\n");
    return 0;
  }
  try {
    auto project =
        budledger::store::Project::open(projectPath, budledger::store::Database::Access::ReadOnly);
    fmt::print("{}", budledger::exporting::projectSummary(project));
    return 0;
  } catch (const std::exception& e) {
    fmt::print(stderr, "budledger: {}\n", e.what());
    return 1;
  }
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App cli{
      "BudLedger workstation: proofread division calls, sign off lifespans "
      "(research software, not for clinical or diagnostic use)",
      "budledger"};
  cli.set_version_flag("--version", fmt::format("budledger {}", budledger::kVersion));
  std::string projectPath;
  std::string screenshot;
  cli.add_option("project", projectPath, "Project file (.budledger) to open");
  cli.add_option("--screenshot", screenshot,
                 "Render the main window once the project is loaded, save it as PNG, and exit");
  try {
    cli.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return cli.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return cli.exit(e);
  } catch (const CLI::ParseError& e) {
    fmt::print(stderr, "budledger: {} (see budledger --help)\n", e.what());
    return 2;
  }

  if (!hasDisplay()) {
    if (screenshot.empty()) return printHeadlessSummary(projectPath);
    qputenv("QT_QPA_PLATFORM", "offscreen");  // a screenshot needs no screen
  }

  QApplication app(argc, argv);
  QApplication::setOrganizationName(QStringLiteral("BudLedger"));
  QApplication::setApplicationName(QStringLiteral("BudLedger"));
  QApplication::setApplicationVersion(QString::fromLatin1(budledger::kVersion));
  QFile style(QStringLiteral(":/style/workstation.qss"));
  if (style.open(QIODevice::ReadOnly)) app.setStyleSheet(QString::fromUtf8(style.readAll()));

  QSettings settings;
  budledger::ui::MainWindowOptions options;
  options.cropSources = [](budledger::ui::ReviewSession& session) {
    return budledger::ui::ProjectCropSource::open(session.project());
  };
  budledger::ui::MainWindow window(settings, options);
  window.show();
  if (!projectPath.empty()) {
    const bool quiet = !screenshot.empty();
    if (auto err = window.openProject(QString::fromStdString(projectPath), quiet); err && quiet) {
      fmt::print(stderr, "budledger: {}\n", err->toStdString());
      return 1;
    }
  }
  if (!screenshot.empty()) {
    QTimer::singleShot(300, &window, [&window, &screenshot] {
      // Pictures are made in the background: let them arrive before the shot.
      for (int i = 0; i < 3 && window.loader(); ++i) {
        window.loader()->waitForIdle();
        QApplication::processEvents();
      }
      const bool ok = window.grab().save(QString::fromStdString(screenshot), "PNG");
      if (!ok) fmt::print(stderr, "budledger: cannot write screenshot '{}'\n", screenshot);
      QApplication::exit(ok ? 0 : 1);
    });
  }
  return app.exec();
}
