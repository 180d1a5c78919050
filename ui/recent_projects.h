#pragma once
// RecentProjects: the most-recently-opened project paths, kept in QSettings
// (newest first, at most kMax, missing files dropped when listed).
#include <QSettings>
#include <QStringList>

namespace budledger::ui {

class RecentProjects {
 public:
  static constexpr int kMax = 8;
  explicit RecentProjects(QSettings& settings) : settings_(settings) {}
  QStringList list() const;
  void add(const QString& path);
  void clear();

 private:
  QSettings& settings_;
};

}  // namespace budledger::ui
