#include "ui/review_queue_model.h"

#include <QBrush>
#include <QColor>

namespace budledger::ui {

ReviewQueueModel::ReviewQueueModel(QObject* parent) : QAbstractTableModel(parent) {}

void ReviewQueueModel::setSession(ReviewSession* session, PriorityOptions options) {
  if (session_) disconnect(session_, nullptr, this, nullptr);
  beginResetModel();
  session_ = session;
  options_ = options;
  byTrap_.clear();
  rows_.clear();
  if (session_) {
    for (const TrapId t : session_->allTraps()) {
      TrapReviewInput in{t,
                         &session_->events(t),
                         &session_->tenures(t),
                         &session_->measurements(t),
                         &session_->drift(t.position),
                         session_->intervalMinutes()};
      byTrap_[t] = reviewItems(in, options_);
    }
    for (const auto& [t, list] : byTrap_) rows_.insert(rows_.end(), list.begin(), list.end());
    sortByNeed(rows_);
    connect(session_, &ReviewSession::trapChanged, this, &ReviewQueueModel::recompute);
  }
  endResetModel();
}

void ReviewQueueModel::recompute(TrapId t) {
  TrapReviewInput in{t,
                     &session_->events(t),
                     &session_->tenures(t),
                     &session_->measurements(t),
                     &session_->drift(t.position),
                     session_->intervalMinutes()};
  byTrap_[t] = reviewItems(in, options_);
  rebuildRows();
  emit trapNeedChanged(t);
}

void ReviewQueueModel::rebuildRows() {
  beginResetModel();
  rows_.clear();
  for (const auto& [t, list] : byTrap_) rows_.insert(rows_.end(), list.begin(), list.end());
  sortByNeed(rows_);
  endResetModel();
}

double ReviewQueueModel::trapNeed(TrapId trap) const {
  auto it = byTrap_.find(trap);
  if (it == byTrap_.end()) return 0;
  double sum = 0;
  for (const auto& i : it->second) sum += i.need;
  return sum;
}

int ReviewQueueModel::trapItemCount(TrapId trap) const {
  auto it = byTrap_.find(trap);
  return it == byTrap_.end() ? 0 : static_cast<int>(it->second.size());
}

int ReviewQueueModel::rowCount(const QModelIndex& parent) const {
  return parent.isValid() ? 0 : static_cast<int>(rows_.size());
}

int ReviewQueueModel::columnCount(const QModelIndex& parent) const {
  return parent.isValid() ? 0 : ColumnCount;
}

QVariant ReviewQueueModel::data(const QModelIndex& index, int role) const {
  if (!index.isValid() || index.row() >= rowCount()) return {};
  const ReviewItem& i = item(index.row());
  if (role == Qt::DisplayRole) {
    switch (index.column()) {
      case NeedColumn:
        return QString::number(i.need, 'f', 2);
      case TrapColumn:
        return tr("pos %1 · trap %2").arg(i.trap.position).arg(i.trap.trap);
      case FrameColumn:
        return i.frame;
      case KindColumn:
        return kindName(i.kind);
      case WhyColumn:
        return i.why;
    }
  }
  if (role == Qt::ToolTipRole) return i.why;
  if (role == Qt::TextAlignmentRole &&
      (index.column() == NeedColumn || index.column() == FrameColumn))
    return QVariant(Qt::AlignRight | Qt::AlignVCenter);
  return {};
}

QVariant ReviewQueueModel::headerData(int section, Qt::Orientation o, int role) const {
  if (o != Qt::Horizontal || role != Qt::DisplayRole) return {};
  switch (section) {
    case NeedColumn:
      return tr("Need");
    case TrapColumn:
      return tr("Trap");
    case FrameColumn:
      return tr("Frame");
    case KindColumn:
      return tr("Call");
    case WhyColumn:
      return tr("Why");
  }
  return {};
}

}  // namespace budledger::ui
