#pragma once
// MainWindow: the workstation's shell. It owns the open ReviewSession, the
// thumbnail loader and the key map, builds menus and docks, and routes each
// keyboard command to the view or panel that carries it out. Views read from
// the session; edits go through core/store only. Geometry, recent projects
// and keys persist in QSettings.
#include <QMainWindow>
#include <QSettings>
#include <functional>
#include <map>
#include <memory>
#include <optional>

#include "ui/crop_source.h"
#include "ui/key_map.h"
#include "ui/project_build.h"
#include "ui/review_priority.h"
#include "ui/review_session.h"
#include "ui/thumbnail_loader.h"

class QLabel;
class QMenu;

namespace budledger::ui {

class AnalysisDialog;
class AuditTrailPanel;
class EditCommands;
class ResultsPanel;
class ReviewQueuePanel;
class StripWorkspace;
class SurvivalModel;
class SurvivalPlot;
class TimeStripView;
class TrapImageView;
class TrapListPanel;

// Where pictures come from for an opened project (null: none available).
using CropSourceFactory = std::function<std::shared_ptr<const CropSource>(ReviewSession&)>;

struct MainWindowOptions {
  CropSourceFactory cropSources;
  ThumbnailLoaderOptions thumbnails;
};

class MainWindow : public QMainWindow {
  Q_OBJECT

 public:
  explicit MainWindow(QSettings& settings, MainWindowOptions options = {},
                      QWidget* parent = nullptr);
  ~MainWindow() override;

  // Opens a project; on failure returns the reason (and shows it in a dialog
  // unless `quiet`). Never leaves a half-open project behind.
  std::optional<QString> openProject(const QString& path, bool quiet = false);
  bool hasProject() const { return session_ != nullptr; }
  ReviewSession* session() const { return session_.get(); }
  store::Project* project() const { return session_ ? &session_->project() : nullptr; }

  TimeStripView* strips() const;
  StripWorkspace* workspace() const { return workspace_; }
  TrapListPanel* trapPanel() const { return trapPanel_; }
  ReviewQueuePanel* queuePanel() const { return queuePanel_; }
  ResultsPanel* resultsPanel() const { return results_; }
  TrapImageView* trapImage() const { return trapImage_; }
  SurvivalModel* survival() const { return survival_; }
  SurvivalPlot* survivalPlot() const { return survivalPlot_; }
  ThumbnailLoader* loader() const { return loader_.get(); }
  KeyMap& keyMap() { return keyMap_; }
  EditCommands* edits() const { return edits_; }
  AuditTrailPanel* auditTrail() const { return audit_; }
  // Review → Sign off… and Review → Who is reviewing… (modal dialogs).
  void showSignOff();
  void chooseIdentity();
  // File → New project from images… (modal), then analyseAndOpen().
  void newProjectFromImages();
  // Analyses a plan in the background behind a progress dialog (returned; it
  // deletes itself when done) and opens the project when it is built. A
  // failure is a dialog naming the cause; a cancel leaves nothing behind.
  AnalysisDialog* analyseAndOpen(NewProjectPlan plan);
  QAction* action(Command c) const;
  // Carries out a command as its key would.
  void run(Command c);

 protected:
  void closeEvent(QCloseEvent* event) override;

 private:
  void buildActions();
  void buildMenus();
  void buildDocks();
  void applyKeys();
  void rebuildRecentMenu();
  void closeProject();
  void showPosition(int position);
  void goToTrap(TrapId trap, std::optional<int> frame);
  void onCursorChanged(TrapId trap, int frame);
  void autoLevels();
  void chooseProjectToOpen();
  void showShortcuts();
  void showAbout();
  void say(const QString& message);
  void updateEditability();

  QSettings& settings_;
  MainWindowOptions options_;
  KeyMap keyMap_;
  std::unique_ptr<ReviewSession> session_;
  std::unique_ptr<ThumbnailLoader> loader_;
  std::map<Command, QAction*> actions_;
  StripWorkspace* workspace_ = nullptr;
  TrapListPanel* trapPanel_ = nullptr;
  ReviewQueuePanel* queuePanel_ = nullptr;
  ResultsPanel* results_ = nullptr;
  TrapImageView* trapImage_ = nullptr;
  SurvivalModel* survival_ = nullptr;
  SurvivalPlot* survivalPlot_ = nullptr;
  EditCommands* edits_ = nullptr;
  AuditTrailPanel* audit_ = nullptr;
  QLabel* cursorLabel_ = nullptr;
  QMenu* recentMenu_ = nullptr;
  QMenu* viewMenu_ = nullptr;
  bool auditStale_ = false;  // edits made while the audit trail was hidden
};

}  // namespace budledger::ui
