#pragma once
// MainWindow: the workstation's shell — menus, the trap list dock, the central
// area for time strips and the status bar. It owns the open Project; views
// read from it and edits go through core/store only. Geometry and recent
// projects persist in QSettings.
#include <QMainWindow>
#include <QSettings>
#include <memory>
#include <optional>

#include "core/store/project.h"

class QLabel;
class QMenu;
class QTreeWidget;

namespace budledger::ui {

class MainWindow : public QMainWindow {
  Q_OBJECT

 public:
  explicit MainWindow(QSettings& settings, QWidget* parent = nullptr);
  ~MainWindow() override;

  // Opens a project; on failure returns the reason (and shows it in a dialog
  // unless `quiet`). Never leaves a half-open project behind.
  std::optional<QString> openProject(const QString& path, bool quiet = false);
  bool hasProject() const { return project_ != nullptr; }
  store::Project* project() const { return project_.get(); }

 protected:
  void closeEvent(QCloseEvent* event) override;

 private:
  void buildMenus();
  void rebuildRecentMenu();
  void showProject();
  void chooseProjectToOpen();
  void showShortcuts();
  void showAbout();

  QSettings& settings_;
  std::unique_ptr<store::Project> project_;
  QTreeWidget* trapList_ = nullptr;
  QLabel* central_ = nullptr;
  QMenu* recentMenu_ = nullptr;
};

}  // namespace budledger::ui
