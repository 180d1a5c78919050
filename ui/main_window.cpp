#include "ui/main_window.h"

#include <QAction>
#include <QApplication>
#include <QCloseEvent>
#include <QComboBox>
#include <QDockWidget>
#include <QFileDialog>
#include <QFileInfo>
#include <QKeySequence>
#include <QLabel>
#include <QMenuBar>
#include <QMessageBox>
#include <QStatusBar>
#include <QTreeView>

#include "budledger/version.h"
#include "ui/analysis_dialog.h"
#include "ui/audit_trail_panel.h"
#include "ui/counted.h"
#include "ui/edit_commands.h"
#include "ui/identity.h"
#include "ui/levels_bar.h"
#include "ui/new_project_dialog.h"
#include "ui/recent_projects.h"
#include "ui/results_panel.h"
#include "ui/review_queue_panel.h"
#include "ui/shortcuts_dialog.h"
#include "ui/sign_off_dialog.h"
#include "ui/strip_workspace.h"
#include "ui/survival_model.h"
#include "ui/survival_plot.h"
#include "ui/time_strip_view.h"
#include "ui/trap_image_view.h"
#include "ui/trap_list_panel.h"

namespace budledger::ui {

namespace {
constexpr int kStatusMs = 8000;

// The store's reason starts "read-only: …"; the banner says so already.
QString bannerReason(QString why) {
  const QString prefix = QStringLiteral("read-only: ");
  if (why.startsWith(prefix)) why.remove(0, prefix.size());
  return why;
}

// Commands that act wherever the focus is in the window; the rest act on the strips.
bool windowWide(Command c) {
  switch (c) {
    case Command::Undo:
    case Command::Redo:
    case Command::NextQueueItem:
    case Command::PreviousQueueItem:
    case Command::ZoomIn:
    case Command::ZoomOut:
    case Command::ZoomFit:
    case Command::ZoomCrops:
    case Command::AutoLevels:
      return true;
    default:
      return false;
  }
}

bool isEdit(Command c) { return KeyMap::info(c).group == CommandGroup::Edit; }
}  // namespace

MainWindow::MainWindow(QSettings& settings, MainWindowOptions options, QWidget* parent)
    : QMainWindow(parent), settings_(settings), options_(std::move(options)), keyMap_(settings) {
  setWindowTitle(tr("BudLedger"));
  setWindowIcon(QIcon(QStringLiteral(":/icons/budledger.svg")));
  workspace_ = new StripWorkspace(this);
  setCentralWidget(workspace_);
  buildDocks();
  buildActions();
  buildMenus();
  applyKeys();
  connect(&keyMap_, &KeyMap::changed, this, &MainWindow::applyKeys);

  TimeStripView* s = strips();
  connect(s, &TimeStripView::cursorChanged, this, &MainWindow::onCursorChanged);
  edits_ = new EditCommands(settings_, s, this);
  connect(edits_, &EditCommands::said, this, &MainWindow::say);
  connect(s, &TimeStripView::moveRequested, this,
          [this](std::int64_t id, int frame) { edits_->moveTo(id, frame); });
  connect(workspace_, &StripWorkspace::zoomInClicked, this, [this] { run(Command::ZoomIn); });
  connect(workspace_, &StripWorkspace::zoomOutClicked, this, [this] { run(Command::ZoomOut); });
  connect(workspace_, &StripWorkspace::zoomFitClicked, this, [this] { run(Command::ZoomFit); });
  connect(workspace_, &StripWorkspace::zoomCropsClicked, this, [this] { run(Command::ZoomCrops); });
  connect(workspace_->levels(), &LevelsBar::levelsChanged, this, [this](const DisplayLevels& lv) {
    if (loader_) loader_->setLevels(lv);
    strips()->viewport()->update();
    trapImage_->update();
  });
  connect(workspace_->levels(), &LevelsBar::autoRequested, this, &MainWindow::autoLevels);
  connect(workspace_->positions(), &QComboBox::activated, this,
          [this](int index) { showPosition(workspace_->positions()->itemData(index).toInt()); });

  cursorLabel_ = new QLabel(this);
  cursorLabel_->setObjectName(QStringLiteral("cursorLabel"));
  statusBar()->addPermanentWidget(cursorLabel_);
  statusBar()->showMessage(tr("Ready"));
  resize(1280, 800);
  restoreGeometry(settings_.value(QStringLiteral("mainWindow/geometry")).toByteArray());
  restoreState(settings_.value(QStringLiteral("mainWindow/state")).toByteArray());
  updateEditability();
}

MainWindow::~MainWindow() {
  // Views hold raw pointers to the session and loader: detach them first.
  closeProject();
}

TimeStripView* MainWindow::strips() const { return workspace_->strips(); }

QAction* MainWindow::action(Command c) const {
  auto it = actions_.find(c);
  return it == actions_.end() ? nullptr : it->second;
}

void MainWindow::buildDocks() {
  trapPanel_ = new TrapListPanel(this);
  trapPanel_->setMinimumWidth(372);  // every column of the trap list, scroll bar included
  auto* trapDock = new QDockWidget(tr("Traps"), this);
  trapDock->setObjectName(QStringLiteral("trapDock"));
  trapDock->setWidget(trapPanel_);
  addDockWidget(Qt::LeftDockWidgetArea, trapDock);

  queuePanel_ = new ReviewQueuePanel(this);
  auto* queueDock = new QDockWidget(tr("Review queue"), this);
  queueDock->setObjectName(QStringLiteral("queueDock"));
  queueDock->setWidget(queuePanel_);
  addDockWidget(Qt::LeftDockWidgetArea, queueDock);
  tabifyDockWidget(trapDock, queueDock);
  trapDock->raise();

  trapImage_ = new TrapImageView(this);
  auto* imageDock = new QDockWidget(tr("Current trap"), this);
  imageDock->setObjectName(QStringLiteral("imageDock"));
  imageDock->setWidget(trapImage_);
  addDockWidget(Qt::RightDockWidgetArea, imageDock);

  results_ = new ResultsPanel(this);
  auto* resultsDock = new QDockWidget(tr("Results"), this);
  resultsDock->setObjectName(QStringLiteral("resultsDock"));
  resultsDock->setWidget(results_);
  addDockWidget(Qt::RightDockWidgetArea, resultsDock);

  survival_ = new SurvivalModel(this);
  survivalPlot_ = new SurvivalPlot(this);
  auto* survivalDock = new QDockWidget(tr("Survival by group"), this);
  survivalDock->setObjectName(QStringLiteral("survivalDock"));
  survivalDock->setWidget(survivalPlot_);
  addDockWidget(Qt::RightDockWidgetArea, survivalDock);
  connect(survival_, &SurvivalModel::changed, this, [this] {
    survivalPlot_->setCurves(survival_->curves());
    survivalPlot_->setNote(survival_->comparison());
  });

  audit_ = new AuditTrailPanel(this);
  auto* auditDock = new QDockWidget(tr("Audit trail"), this);
  auditDock->setObjectName(QStringLiteral("auditDock"));
  auditDock->setWidget(audit_);
  addDockWidget(Qt::BottomDockWidgetArea, auditDock);
  auditDock->hide();  // View → Audit trail; it takes room the strips need while proofreading
  // The trail re-reads the journal; while hidden it waits until it is shown
  // rather than grow the cost of every edit with the journal's length.
  connect(auditDock, &QDockWidget::visibilityChanged, this, [this](bool visible) {
    if (visible && auditStale_) {
      auditStale_ = false;
      if (audit_->isVisible())
        audit_->refresh();
      else
        auditStale_ = true;
    }
  });
  connect(audit_, &AuditTrailPanel::eventChosen, this, [this](std::int64_t id) {
    if (!session_) return;
    if (const ReviewEvent* e = session_->event(id)) {
      goToTrap({e->event.position, e->event.trap}, e->event.frame);
      strips()->selectEvent(id);
      strips()->setFocus();
    }
  });

  connect(trapPanel_, &TrapListPanel::trapChosen, this, [this](TrapId t) {
    goToTrap(t, std::nullopt);
    strips()->setFocus();
  });
  connect(queuePanel_, &ReviewQueuePanel::itemChosen, this, [this](const ReviewItem& item) {
    goToTrap(item.trap, item.frame);
    strips()->selectEvent(item.eventId);
    say(tr("Review: trap %1, frame %2 — %3").arg(item.trap.trap).arg(item.frame).arg(item.why));
    strips()->setFocus();
  });
}

void MainWindow::buildActions() {
  for (const auto& info : KeyMap::commands()) {
    auto* a = new QAction(info.title, this);
    a->setObjectName(QString::fromLatin1(info.id));
    a->setShortcutContext(windowWide(info.command) ? Qt::WindowShortcut
                                                   : Qt::WidgetWithChildrenShortcut);
    const Command c = info.command;
    connect(a, &QAction::triggered, this, [this, c] { run(c); });
    if (windowWide(c))
      addAction(a);
    else
      workspace_->addAction(a);
    actions_[c] = a;
  }
}

void MainWindow::applyKeys() {
  for (auto& [c, a] : actions_) a->setShortcuts(keyMap_.keys(c));
}

void MainWindow::buildMenus() {
  QMenu* file = menuBar()->addMenu(tr("&File"));
  QAction* newFromImages =
      file->addAction(tr("&New project from images…"), this, &MainWindow::newProjectFromImages);
  newFromImages->setShortcut(QKeySequence::New);
  QAction* open = file->addAction(tr("&Open project…"), this, &MainWindow::chooseProjectToOpen);
  open->setShortcut(QKeySequence::Open);
  recentMenu_ = file->addMenu(tr("Open &recent"));
  rebuildRecentMenu();
  file->addSeparator();
  QAction* quit = file->addAction(tr("&Quit"), this, &QWidget::close);
  quit->setShortcut(QKeySequence::Quit);

  auto addGroup = [this](QMenu* menu, CommandGroup g) {
    for (const auto& info : KeyMap::commands())
      if (info.group == g) menu->addAction(actions_[info.command]);
  };
  addGroup(menuBar()->addMenu(tr("&Edit")), CommandGroup::Edit);
  QMenu* nav = menuBar()->addMenu(tr("&Navigate"));
  addGroup(nav, CommandGroup::Navigate);
  viewMenu_ = menuBar()->addMenu(tr("&View"));
  addGroup(viewMenu_, CommandGroup::View);
  viewMenu_->addSeparator();
  for (QDockWidget* d : findChildren<QDockWidget*>()) viewMenu_->addAction(d->toggleViewAction());

  QMenu* review = menuBar()->addMenu(tr("&Review"));
  review->addAction(tr("&Sign off…"), this, &MainWindow::showSignOff);
  review->addAction(tr("&Who is reviewing…"), this, &MainWindow::chooseIdentity);

  QMenu* help = menuBar()->addMenu(tr("&Help"));
  QAction* keys = help->addAction(tr("&Keyboard shortcuts"), this, &MainWindow::showShortcuts);
  keys->setShortcut(QKeySequence(Qt::Key_F1));
  help->addAction(tr("&About BudLedger"), this, &MainWindow::showAbout);
}

void MainWindow::rebuildRecentMenu() {
  recentMenu_->clear();
  RecentProjects recent(settings_);
  const QStringList paths = recent.list();
  for (const QString& p : paths)
    recentMenu_->addAction(QFileInfo(p).fileName(), this, [this, p] { openProject(p); })
        ->setToolTip(p);
  recentMenu_->setEnabled(!paths.isEmpty());
}

void MainWindow::closeProject() {
  edits_->setSession(nullptr);
  strips()->setSession(nullptr);
  strips()->setLoader(nullptr);
  trapImage_->setSession(nullptr);
  trapImage_->setLoader(nullptr);
  results_->setSession(nullptr);
  survival_->setSession(nullptr);
  audit_->setDatabase(nullptr);
  queuePanel_->model()->setSession(nullptr);
  trapPanel_->setSession(nullptr, nullptr);
  loader_.reset();
  session_.reset();
}

std::optional<QString> MainWindow::openProject(const QString& path, bool quiet) {
  std::unique_ptr<ReviewSession> session;
  std::shared_ptr<const CropSource> source;
  try {
    session = std::make_unique<ReviewSession>(path, store::Database::Access::ReadWrite);
  } catch (const std::exception& e) {
    const QString why = QString::fromStdString(e.what());
    if (!quiet) QMessageBox::critical(this, tr("Cannot open project"), why);
    say(tr("Could not open %1").arg(path));
    return why;
  }
  // Missing images do not stop the review: events, results and the journal
  // live in the project file; the strips say that pictures are unavailable.
  QString imagesProblem;
  try {
    if (options_.cropSources) source = options_.cropSources(*session);
  } catch (const std::exception& e) {
    imagesProblem = QString::fromStdString(e.what());
  }
  closeProject();
  session_ = std::move(session);
  if (source) {
    loader_ = std::make_unique<ThumbnailLoader>(source, options_.thumbnails);
    loader_->setLevels(workspace_->levels()->levels());
    connect(loader_.get(), &ThumbnailLoader::failed, this,
            [this](const QString& why) { say(tr("Cannot read images: %1").arg(why)); });
  }
  if (loader_ && !session_->allTraps().empty()) {
    // Start from auto levels on the first trap: raw microscope data is rarely full-scale.
    try {
      const DisplayLevels lv = ui::autoLevels(source->crop(session_->allTraps().front(), 0));
      workspace_->levels()->setLevels(lv);
      loader_->setLevels(lv);
    } catch (const std::exception& e) {
      say(tr("Cannot read images: %1").arg(QString::fromStdString(e.what())));
    }
  }
  strips()->setSession(session_.get());
  strips()->setLoader(loader_.get());
  edits_->setSession(session_.get());
  audit_->setDatabase(&session_->project().db());
  connect(session_.get(), &ReviewSession::edited, this, [this] {
    if (audit_->isVisible())
      audit_->refresh();
    else
      auditStale_ = true;
    updateEditability();
    if (auto t = strips()->currentTrap()) onCursorChanged(*t, strips()->cursorFrame());
  });
  strips()->setEditable(!session_->readOnly());
  trapImage_->setSession(session_.get());
  trapImage_->setLoader(loader_.get());
  results_->setSession(session_.get());
  survival_->setSession(session_.get());
  queuePanel_->model()->setSession(session_.get());
  trapPanel_->setSession(session_.get(), queuePanel_->model());

  auto* combo = workspace_->positions();
  combo->clear();
  for (const auto& p : session_->positions())
    combo->addItem(p.group.empty() ? QString::fromStdString(p.name)
                                   : tr("%1 (%2)").arg(QString::fromStdString(p.name),
                                                       QString::fromStdString(p.group)),
                   p.id);
  if (!session_->positions().empty()) showPosition(session_->positions().front().id);
  // Proofreading starts on full crops when there are pictures, else on the whole movie.
  if (loader_)
    strips()->zoomToCrops();
  else
    strips()->zoomToFit();
  workspace_->showBanner(
      session_->readOnly()
          ? tr("Read-only — %1. You can look but not edit; close it there to edit here.")
                .arg(bannerReason(session_->readOnlyReason()))
          : QString());
  setWindowTitle(tr("%1 — BudLedger").arg(QFileInfo(path).fileName()));
  RecentProjects(settings_).add(path);
  rebuildRecentMenu();
  updateEditability();
  if (!imagesProblem.isEmpty()) {
    say(tr("Opened without images: %1").arg(imagesProblem));
    if (!quiet)
      QMessageBox::warning(this, tr("Images not available"),
                           tr("The project opened, but its images cannot be read:\n%1\n\nYou "
                              "can review events and results; the strips show no pictures.")
                               .arg(imagesProblem));
    strips()->setFocus();
    return std::nullopt;
  }
  say(tr("Opened %1: %2")
          .arg(QFileInfo(path).fileName(), counted(static_cast<long>(session_->allTraps().size()),
                                                   tr("%1 trap"), tr("%1 traps"))));
  strips()->setFocus();
  return std::nullopt;
}

void MainWindow::updateEditability() {
  const bool canEdit = session_ && !session_->readOnly();
  for (auto& [c, a] : actions_)
    if (isEdit(c)) a->setEnabled(canEdit);
  if (!canEdit) return;
  // Undo and redo name what they would do, in the menu and the tooltip.
  const QString u = session_->nextUndo(), r = session_->nextRedo();
  action(Command::Undo)->setEnabled(!u.isEmpty());
  action(Command::Undo)->setText(u.isEmpty() ? tr("Undo") : tr("Undo %1").arg(u));
  action(Command::Redo)->setEnabled(!r.isEmpty());
  action(Command::Redo)->setText(r.isEmpty() ? tr("Redo") : tr("Redo %1").arg(r));
}

void MainWindow::showPosition(int position) {
  if (!session_) return;
  std::vector<TrapId> lanes;
  for (const auto& t : session_->traps(position)) lanes.push_back({position, t.trap});
  strips()->setLanes(position, std::move(lanes));
  auto* combo = workspace_->positions();
  combo->setCurrentIndex(combo->findData(position));
}

void MainWindow::goToTrap(TrapId trap, std::optional<int> frame) {
  if (strips()->position() != trap.position) showPosition(trap.position);
  strips()->goToTrap(trap, frame);
}

void MainWindow::onCursorChanged(TrapId trap, int frame) {
  trapImage_->showFrame(trap, frame);
  results_->showTrap(trap);
  trapPanel_->showCurrent(trap);
  const QString clock = strips()->axis().clockLabel(frame);
  QString text = clock.isEmpty()
                     ? tr("trap %1 · frame %2").arg(trap.trap).arg(frame)
                     : tr("trap %1 · frame %2 · %3").arg(trap.trap).arg(frame).arg(clock);
  if (const ReviewEvent* e = strips()->eventAtCursor())
    text += tr(" · %1 %2").arg(kindName(e->event.kind), decisionName(e->decision));
  cursorLabel_->setText(text);
}

void MainWindow::run(Command c) {
  TimeStripView* s = strips();
  switch (c) {
    case Command::NextFrame:
      s->moveFrames(1);
      break;
    case Command::PreviousFrame:
      s->moveFrames(-1);
      break;
    case Command::NextFrameFast:
      s->moveFrames(10);
      break;
    case Command::PreviousFrameFast:
      s->moveFrames(-10);
      break;
    case Command::FirstFrame:
      s->setCursor(s->cursorLane(), 0);
      break;
    case Command::LastFrame:
      s->setCursor(s->cursorLane(), s->axis().frameCount() - 1);
      break;
    case Command::NextEvent:
      if (!s->jumpToEvent(+1)) say(tr("No later event in this trap"));
      break;
    case Command::PreviousEvent:
      if (!s->jumpToEvent(-1)) say(tr("No earlier event in this trap"));
      break;
    case Command::NextOpenEvent:
      if (!s->jumpToEvent(+1, true)) say(tr("No later undecided event in this trap"));
      break;
    case Command::PreviousOpenEvent:
      if (!s->jumpToEvent(-1, true)) say(tr("No earlier undecided event in this trap"));
      break;
    case Command::LaneUp:
      s->moveLanes(-1);
      break;
    case Command::LaneDown:
      s->moveLanes(1);
      break;
    case Command::PageUp:
      s->moveLanes(-5);
      break;
    case Command::PageDown:
      s->moveLanes(5);
      break;
    case Command::NextQueueItem:
      if (!queuePanel_->step(+1)) say(tr("Nothing left in the review queue"));
      break;
    case Command::PreviousQueueItem:
      if (!queuePanel_->step(-1)) say(tr("Nothing left in the review queue"));
      break;
    case Command::ZoomIn:
      s->zoomBy(1.5);
      break;
    case Command::ZoomOut:
      s->zoomBy(1 / 1.5);
      break;
    case Command::ZoomFit:
      s->zoomToFit();
      break;
    case Command::ZoomCrops:
      s->zoomToCrops();
      break;
    case Command::AutoLevels:
      autoLevels();
      break;
    default:
      if (isEdit(c)) edits_->run(c);
      break;
  }
  if (!isEdit(c) && c != Command::NextQueueItem && c != Command::PreviousQueueItem)
    if (auto t = s->currentTrap()) onCursorChanged(*t, s->cursorFrame());
}

void MainWindow::autoLevels() {
  auto t = strips()->currentTrap();
  if (!loader_ || !t) {
    say(tr("Auto levels needs images"));
    return;
  }
  try {
    const DisplayLevels lv = ui::autoLevels(loader_->source()->crop(*t, strips()->cursorFrame()));
    workspace_->levels()->setLevels(lv);
    loader_->setLevels(lv);
    strips()->viewport()->update();
    trapImage_->update();
    say(tr("Levels set from trap %1, frame %2").arg(t->trap).arg(strips()->cursorFrame()));
  } catch (const std::exception& e) {
    QMessageBox::warning(this, tr("Cannot read images"), QString::fromStdString(e.what()));
  }
}

void MainWindow::showSignOff() {
  if (!session_) {
    say(tr("Open a project first"));
    return;
  }
  SignOffDialog dialog(*session_, Identity::load(settings_), strips()->currentTrap(), this);
  connect(&dialog, &SignOffDialog::said, this, &MainWindow::say);
  dialog.exec();
  edits_->setSession(session_.get());  // the technician's identity again for the next edits
}

void MainWindow::chooseIdentity() {
  IdentityDialog dialog(Identity::load(settings_),
                        tr("The journal records this name and role with every decision."), this);
  if (dialog.exec() != QDialog::Accepted) return;
  dialog.identity().save(settings_);
  if (session_) edits_->setSession(session_.get());
  say(tr("Reviewing as %1 (%2)").arg(dialog.identity().name, dialog.identity().role));
}

void MainWindow::say(const QString& message) { statusBar()->showMessage(message, kStatusMs); }

void MainWindow::chooseProjectToOpen() {
  const QString path = QFileDialog::getOpenFileName(
      this, tr("Open project"), QString(), tr("BudLedger projects (*.budledger);;All files (*)"));
  if (!path.isEmpty()) openProject(path);
}

void MainWindow::newProjectFromImages() {
  NewProjectDialog dialog(this);
  if (dialog.exec() == QDialog::Accepted) analyseAndOpen(dialog.plan());
}

AnalysisDialog* MainWindow::analyseAndOpen(NewProjectPlan plan) {
  auto* dialog = new AnalysisDialog(std::move(plan), this);
  dialog->setWindowModality(Qt::WindowModal);
  connect(dialog, &AnalysisDialog::finished, this,
          [this, dialog](const QString& path, const QStringList& summary) {
            dialog->deleteLater();
            if (openProject(path)) return;
            say(tr("Analysed: %1").arg(summary.join(tr("; "))));
          });
  connect(dialog, &AnalysisDialog::cancelled, this, [this, dialog] {
    dialog->deleteLater();
    say(tr("Analysis cancelled; no project was written"));
  });
  connect(dialog, &AnalysisDialog::failed, this, [this, dialog](const QString& why) {
    dialog->deleteLater();
    say(tr("Analysis failed; no project was written"));
    QMessageBox::critical(this, tr("Analysis failed"),
                          tr("No project was written.\n\n%1").arg(why));
  });
  dialog->show();
  dialog->start();
  return dialog;
}

void MainWindow::showShortcuts() {
  ShortcutsDialog dialog(keyMap_, this);
  dialog.exec();
}

void MainWindow::showAbout() {
  QMessageBox::about(this, tr("About BudLedger"),
                     tr("<b>BudLedger %1</b><p>Proofreading workstation for replicative-lifespan "
                        "experiments on budding yeast in microfluidic traps.</p>"
                        "<p>Research software: not for clinical or diagnostic use.</p>")
                         .arg(QString::fromLatin1(kVersion)));
}

void MainWindow::closeEvent(QCloseEvent* event) {
  settings_.setValue(QStringLiteral("mainWindow/geometry"), saveGeometry());
  settings_.setValue(QStringLiteral("mainWindow/state"), saveState());
  event->accept();
}

}  // namespace budledger::ui
