#include "ui/audit_trail_model.h"

namespace budledger::ui {

AuditTrailModel::AuditTrailModel(QObject* parent) : QAbstractTableModel(parent) {}

void AuditTrailModel::setDatabase(store::Database* db) {
  beginResetModel();
  db_ = db;
  entries_ = db_ ? store::readJournal(*db_) : std::vector<store::JournalEntry>{};
  endResetModel();
}

void AuditTrailModel::refresh() {
  if (!db_) return;
  const std::int64_t next = entries_.empty() ? 1 : entries_.back().seq + 1;
  auto fresh = store::readJournal(*db_, next);
  if (fresh.empty()) return;
  const int first = static_cast<int>(entries_.size());
  beginInsertRows({}, first, first + static_cast<int>(fresh.size()) - 1);
  for (auto& e : fresh) entries_.push_back(std::move(e));
  endInsertRows();
}

int AuditTrailModel::rowCount(const QModelIndex& parent) const {
  return parent.isValid() ? 0 : static_cast<int>(entries_.size());
}

int AuditTrailModel::columnCount(const QModelIndex& parent) const {
  return parent.isValid() ? 0 : ColumnCount;
}

QString AuditTrailModel::text(const store::JournalEntry& e, int column) {
  auto q = [](const std::string& s) { return QString::fromStdString(s); };
  switch (column) {
    case SeqColumn:
      return QString::number(e.seq);
    case WhenColumn:
      return q(e.utc);
    case WhoColumn:
      return q(e.actor);
    case RoleColumn:
      return q(e.role);
    case ActionColumn:
      return e.unknownAction ? q(*e.unknownAction) : q(std::string(toString(e.action)));
    case TargetColumn:
      return q(e.target);
    case BeforeColumn:
      return e.before == "null" ? QString() : q(e.before);
    case AfterColumn:
      return e.after == "null" ? QString() : q(e.after);
    case WhyColumn:
      return q(e.reason);
  }
  return {};
}

QVariant AuditTrailModel::data(const QModelIndex& index, int role) const {
  if (!index.isValid() || index.row() >= rowCount()) return {};
  const auto& e = entry(index.row());
  if (role == Qt::DisplayRole || role == Qt::ToolTipRole) return text(e, index.column());
  if (role == Qt::TextAlignmentRole && index.column() == SeqColumn)
    return QVariant(Qt::AlignRight | Qt::AlignVCenter);
  return {};
}

QVariant AuditTrailModel::headerData(int section, Qt::Orientation o, int role) const {
  if (o != Qt::Horizontal || role != Qt::DisplayRole) return {};
  switch (section) {
    case SeqColumn:
      return tr("#");
    case WhenColumn:
      return tr("When (UTC)");
    case WhoColumn:
      return tr("Who");
    case RoleColumn:
      return tr("Role");
    case ActionColumn:
      return tr("What");
    case TargetColumn:
      return tr("On");
    case BeforeColumn:
      return tr("Before");
    case AfterColumn:
      return tr("After");
    case WhyColumn:
      return tr("Why");
  }
  return {};
}

AuditTrailFilter::AuditTrailFilter(QObject* parent) : QSortFilterProxyModel(parent) {}

void AuditTrailFilter::setText(const QString& text) {
  text_ = text.trimmed();
  invalidateFilter();
}
void AuditTrailFilter::setAction(const QString& action) {
  action_ = action;
  invalidateFilter();
}
void AuditTrailFilter::setPerson(const QString& person) {
  person_ = person;
  invalidateFilter();
}

bool AuditTrailFilter::filterAcceptsRow(int row, const QModelIndex& parent) const {
  auto* m = static_cast<const AuditTrailModel*>(sourceModel());
  if (parent.isValid() || row >= m->rowCount()) return false;
  const auto& e = m->entry(row);
  if (!action_.isEmpty() && AuditTrailModel::text(e, AuditTrailModel::ActionColumn) != action_)
    return false;
  if (!person_.isEmpty() && QString::fromStdString(e.actor) != person_) return false;
  if (text_.isEmpty()) return true;
  for (int c = 0; c < AuditTrailModel::ColumnCount; ++c)
    if (AuditTrailModel::text(e, c).contains(text_, Qt::CaseInsensitive)) return true;
  return false;
}

QString AuditTrailFilter::toCsv() const {
  auto field = [](QString s) {
    if (s.contains(QLatin1Char(',')) || s.contains(QLatin1Char('"')) ||
        s.contains(QLatin1Char('\n')) || s.contains(QLatin1Char('\r'))) {
      s.replace(QStringLiteral("\""), QStringLiteral("\"\""));
      return QStringLiteral("\"%1\"").arg(s);
    }
    return s;
  };
  // Machine-friendly header names, stable across translations.
  QString out = QStringLiteral("seq,utc,actor,role,action,target,before,after,reason\r\n");
  auto* m = static_cast<const AuditTrailModel*>(sourceModel());
  for (int r = 0; r < rowCount(); ++r) {
    const auto& e = m->entry(mapToSource(index(r, 0)).row());
    QStringList cells;
    for (int c = 0; c < AuditTrailModel::ColumnCount; ++c) {
      // Before/after keep JSON's "null" in the file: empty would be ambiguous.
      QString v = AuditTrailModel::text(e, c);
      if ((c == AuditTrailModel::BeforeColumn || c == AuditTrailModel::AfterColumn) && v.isEmpty())
        v = QStringLiteral("null");
      cells << field(v);
    }
    out += cells.join(QLatin1Char(',')) + QStringLiteral("\r\n");
  }
  return out;
}

}  // namespace budledger::ui
