#include "ui/recent_projects.h"

#include <QFileInfo>

namespace budledger::ui {
namespace {
const QString kKey = QStringLiteral("recentProjects");
}

QStringList RecentProjects::list() const {
  QStringList out;
  for (const QString& p : settings_.value(kKey).toStringList())
    if (QFileInfo::exists(p)) out << p;
  return out;
}

void RecentProjects::add(const QString& path) {
  QStringList l = settings_.value(kKey).toStringList();
  const QString abs = QFileInfo(path).absoluteFilePath();
  l.removeAll(abs);
  l.prepend(abs);
  while (l.size() > kMax) l.removeLast();
  settings_.setValue(kKey, l);
}

void RecentProjects::clear() { settings_.remove(kKey); }

}  // namespace budledger::ui
