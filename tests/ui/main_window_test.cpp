// Drives the workstation shell: opening projects (good, missing, foreign),
// the trap list it fills, and the recent-projects menu kept in QSettings.
#include <QMenuBar>
#include <QTemporaryDir>
#include <QTreeView>
#include <QtTest>

#include "core/store/project.h"
#include "ui/main_window.h"
#include "ui/recent_projects.h"

using budledger::ui::MainWindow;

class MainWindowTest : public QObject {
  Q_OBJECT

 private slots:
  void init() {
    settingsFile_ = dir_.filePath(QStringLiteral("settings.ini"));
    QFile::remove(settingsFile_);
  }

  void opensProjectAndListsTraps() {
    const QString path = dir_.filePath(QStringLiteral("a.budledger"));
    QFile::remove(path);
    {
      auto p = budledger::store::Project::create(path.toStdString());
      const int pos = p.addPosition({0, "pos01", "control", 10, 100, 100});
      p.replaceTraps(pos, {{pos, 0, 0, 0, 10, 10, false}, {pos, 1, 0, 1, 30, 10, false}});
    }
    QSettings settings(settingsFile_, QSettings::IniFormat);
    MainWindow w(settings);
    QVERIFY(!w.openProject(path, true).has_value());
    QVERIFY(w.hasProject());
    auto* list = w.findChild<QTreeView*>(QStringLiteral("trapList"));
    QVERIFY(list);
    QCOMPARE(list->model()->rowCount(), 2);
    QVERIFY(w.windowTitle().contains(QStringLiteral("a.budledger")));
    QCOMPARE(budledger::ui::RecentProjects(settings).list().size(), 1);
  }

  void missingProjectIsAnErrorNotACrash() {
    QSettings settings(settingsFile_, QSettings::IniFormat);
    MainWindow w(settings);
    const auto err = w.openProject(dir_.filePath(QStringLiteral("nope.budledger")), true);
    QVERIFY(err.has_value());
    QVERIFY(err->contains(QStringLiteral("does not exist")));
    QVERIFY(!w.hasProject());
  }

  void foreignFileIsRefused() {
    const QString path = dir_.filePath(QStringLiteral("foreign.budledger"));
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write("definitely not a database");
    f.close();
    QSettings settings(settingsFile_, QSettings::IniFormat);
    MainWindow w(settings);
    QVERIFY(w.openProject(path, true).has_value());
    QVERIFY(!w.hasProject());
  }

  void recentListIsNewestFirstAndBounded() {
    QSettings settings(settingsFile_, QSettings::IniFormat);
    budledger::ui::RecentProjects recent(settings);
    for (int i = 0; i < 12; ++i) {
      const QString p = dir_.filePath(QStringLiteral("r%1.budledger").arg(i));
      QFile f(p);
      QVERIFY(f.open(QIODevice::WriteOnly));
      recent.add(p);
    }
    const QStringList l = recent.list();
    QCOMPARE(l.size(), budledger::ui::RecentProjects::kMax);
    QVERIFY(l.first().endsWith(QStringLiteral("r11.budledger")));
  }

  void hasTheMenusOfTheShell() {
    QSettings settings(settingsFile_, QSettings::IniFormat);
    MainWindow w(settings);
    QStringList titles;
    for (QAction* a : w.menuBar()->actions()) titles << a->text().remove(QLatin1Char('&'));
    QCOMPARE(titles, (QStringList{QStringLiteral("File"), QStringLiteral("Edit"),
                                  QStringLiteral("Navigate"), QStringLiteral("View"),
                                  QStringLiteral("Review"), QStringLiteral("Help")}));
  }

 private:
  QTemporaryDir dir_;
  QString settingsFile_;
};

QTEST_MAIN(MainWindowTest)
#include "main_window_test.moc"
