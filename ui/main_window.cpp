#include "ui/main_window.h"

#include <QAction>
#include <QApplication>
#include <QCloseEvent>
#include <QDockWidget>
#include <QFileDialog>
#include <QFileInfo>
#include <QHeaderView>
#include <QKeySequence>
#include <QLabel>
#include <QMenuBar>
#include <QMessageBox>
#include <QStatusBar>
#include <QTreeWidget>

#include "budledger/version.h"
#include "core/export/summary.h"
#include "ui/recent_projects.h"

namespace budledger::ui {

MainWindow::MainWindow(QSettings& settings, QWidget* parent)
    : QMainWindow(parent), settings_(settings) {
  setWindowTitle(tr("BudLedger"));
  setWindowIcon(QIcon(QStringLiteral(":/icons/budledger.svg")));

  trapList_ = new QTreeWidget(this);
  trapList_->setObjectName(QStringLiteral("trapList"));
  trapList_->setHeaderLabels({tr("Trap"), tr("Row"), tr("Col")});
  trapList_->header()->setSectionResizeMode(QHeaderView::ResizeToContents);
  auto* dock = new QDockWidget(tr("Traps"), this);
  dock->setObjectName(QStringLiteral("trapDock"));
  dock->setWidget(trapList_);
  addDockWidget(Qt::LeftDockWidgetArea, dock);

  central_ = new QLabel(this);
  central_->setObjectName(QStringLiteral("emptyState"));
  central_->setAlignment(Qt::AlignCenter);
  central_->setWordWrap(true);
  central_->setText(tr("No project open.\nFile → Open project… (Ctrl+O) opens a .budledger file."));
  setCentralWidget(central_);

  buildMenus();
  statusBar()->showMessage(tr("Ready"));
  resize(1280, 800);
  restoreGeometry(settings_.value(QStringLiteral("mainWindow/geometry")).toByteArray());
  restoreState(settings_.value(QStringLiteral("mainWindow/state")).toByteArray());
}

MainWindow::~MainWindow() = default;

void MainWindow::buildMenus() {
  QMenu* file = menuBar()->addMenu(tr("&File"));
  QAction* newFromImages = file->addAction(tr("&New project from images…"));
  newFromImages->setShortcut(QKeySequence::New);
  newFromImages->setEnabled(false);
  newFromImages->setToolTip(tr("Use budledger-cli analyze until the import dialog lands"));
  QAction* open = file->addAction(tr("&Open project…"), this, &MainWindow::chooseProjectToOpen);
  open->setShortcut(QKeySequence::Open);
  recentMenu_ = file->addMenu(tr("Open &recent"));
  rebuildRecentMenu();
  file->addSeparator();
  QAction* quit = file->addAction(tr("&Quit"), this, &QWidget::close);
  quit->setShortcut(QKeySequence::Quit);

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

std::optional<QString> MainWindow::openProject(const QString& path, bool quiet) {
  try {
    auto project = std::make_unique<store::Project>(store::Project::open(path.toStdString()));
    project_ = std::move(project);
  } catch (const std::exception& e) {
    const QString why = QString::fromStdString(e.what());
    if (!quiet) QMessageBox::critical(this, tr("Cannot open project"), why);
    statusBar()->showMessage(tr("Could not open %1").arg(path));
    return why;
  }
  RecentProjects(settings_).add(path);
  rebuildRecentMenu();
  showProject();
  statusBar()->showMessage(tr("Opened %1").arg(QFileInfo(path).fileName()));
  return std::nullopt;
}

void MainWindow::showProject() {
  setWindowTitle(
      tr("%1 — BudLedger").arg(QFileInfo(QString::fromStdString(project_->path())).fileName()));
  trapList_->clear();
  for (const auto& pos : project_->positions()) {
    auto* posItem = new QTreeWidgetItem(trapList_, {QString::fromStdString(pos.name)});
    for (const auto& t : project_->traps(pos.id))
      new QTreeWidgetItem(
          posItem, {tr("trap %1").arg(t.trap), QString::number(t.row), QString::number(t.col)});
    posItem->setExpanded(true);
  }
  central_->setText(QString::fromStdString(exporting::projectSummary(*project_)));
  central_->setAlignment(Qt::AlignLeft | Qt::AlignTop);
}

void MainWindow::chooseProjectToOpen() {
  const QString path = QFileDialog::getOpenFileName(
      this, tr("Open project"), QString(), tr("BudLedger projects (*.budledger);;All files (*)"));
  if (!path.isEmpty()) openProject(path);
}

void MainWindow::showShortcuts() {
  QMessageBox::information(this, tr("Keyboard shortcuts"),
                           tr("Ctrl+O  Open project\nCtrl+Q  Quit\nF1  This list"));
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
