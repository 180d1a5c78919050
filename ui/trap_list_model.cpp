#include "ui/trap_list_model.h"

#include <numeric>

#include "ui/review_state_mark.h"

namespace budledger::ui {

namespace {
int packTrap(TrapId t) { return t.position * 65536 + t.trap; }
}  // namespace

TrapListModel::TrapListModel(QObject* parent) : QAbstractTableModel(parent) {}

void TrapListModel::setSession(ReviewSession* session, const ReviewQueueModel* queue) {
  if (session_) disconnect(session_, nullptr, this, nullptr);
  if (queue_) disconnect(queue_, nullptr, this, nullptr);
  beginResetModel();
  session_ = session;
  queue_ = queue;
  traps_ = session_ ? session_->allTraps() : std::vector<TrapId>{};
  endResetModel();
  // The queue recomputes after the session changes, so its signal is the one to follow.
  if (queue_)
    connect(queue_, &ReviewQueueModel::trapNeedChanged, this, &TrapListModel::refresh);
  else if (session_)
    connect(session_, &ReviewSession::trapChanged, this, &TrapListModel::refresh);
}

int TrapListModel::rowOf(TrapId trap) const {
  auto it = std::find(traps_.begin(), traps_.end(), trap);
  return it == traps_.end() ? -1 : static_cast<int>(it - traps_.begin());
}

void TrapListModel::refresh(TrapId trap) {
  const int row = rowOf(trap);
  if (row >= 0) emit dataChanged(index(row, 0), index(row, ColumnCount - 1));
}

int TrapListModel::rowCount(const QModelIndex& parent) const {
  return parent.isValid() ? 0 : static_cast<int>(traps_.size());
}

int TrapListModel::columnCount(const QModelIndex& parent) const {
  return parent.isValid() ? 0 : ColumnCount;
}

QVariant TrapListModel::data(const QModelIndex& index, int role) const {
  if (!index.isValid() || !session_ || index.row() >= rowCount()) return {};
  const TrapId t = trapAt(index.row());
  if (role == kTrapRole) return packTrap(t);
  const ReviewState state = session_->reviewState(t);
  if (role == kStateRole) return static_cast<int>(state);
  if (role == Qt::DecorationRole && index.column() == StateColumn) return reviewStateIcon(state);
  if (role == Qt::TextAlignmentRole && index.column() >= DivisionsColumn)
    return QVariant(Qt::AlignRight | Qt::AlignVCenter);
  if (role != Qt::DisplayRole && role != Qt::EditRole) return {};
  switch (index.column()) {
    case TrapColumn: {
      const auto* pos = session_->position(t.position);
      const QString name = pos ? QString::fromStdString(pos->name) : QString::number(t.position);
      return tr("%1 · %2").arg(name).arg(t.trap);
    }
    case StateColumn:
      return reviewStateName(state);
    case DivisionsColumn: {
      const auto& ten = session_->tenures(t);
      return std::accumulate(ten.begin(), ten.end(), 0,
                             [](int a, const auto& x) { return a + x.divisions; });
    }
    case OpenColumn: {
      const auto& ev = session_->events(t);
      return static_cast<int>(std::count_if(ev.begin(), ev.end(), [](const ReviewEvent& e) {
        return e.decision == Decision::Proposed;
      }));
    }
    case NeedColumn:
      return queue_
                 ? (role == Qt::EditRole ? QVariant(queue_->trapNeed(t))
                                         : QVariant(QString::number(queue_->trapNeed(t), 'f', 1)))
                 : QVariant();
  }
  return {};
}

QVariant TrapListModel::headerData(int section, Qt::Orientation o, int role) const {
  if (o != Qt::Horizontal) return {};
  if (role == Qt::ToolTipRole) {
    switch (section) {
      case OpenColumn:
        return tr("Calls nobody has decided on yet");
      case NeedColumn:
        return tr("How much this trap needs a person (sum over its doubtful calls)");
    }
    return {};
  }
  if (role != Qt::DisplayRole) return {};
  switch (section) {
    case TrapColumn:
      return tr("Trap");
    case StateColumn:
      return tr("Review");
    case DivisionsColumn:
      return tr("Div.");
    case OpenColumn:
      return tr("Open");
    case NeedColumn:
      return tr("Need");
  }
  return {};
}

TrapFilterModel::TrapFilterModel(QObject* parent) : QSortFilterProxyModel(parent) {}

void TrapFilterModel::setStateFilter(std::optional<ReviewState> state) {
  state_ = state;
  invalidateFilter();
}

void TrapFilterModel::setPositionFilter(std::optional<int> position) {
  position_ = position;
  invalidateFilter();
}

bool TrapFilterModel::filterAcceptsRow(int row, const QModelIndex& parent) const {
  const QModelIndex i = sourceModel()->index(row, 0, parent);
  if (state_ &&
      sourceModel()->data(i, TrapListModel::kStateRole).toInt() != static_cast<int>(*state_))
    return false;
  if (position_ && sourceModel()->data(i, TrapListModel::kTrapRole).toInt() / 65536 != *position_)
    return false;
  return true;
}

bool TrapFilterModel::lessThan(const QModelIndex& a, const QModelIndex& b) const {
  if (a.column() == TrapListModel::TrapColumn)
    return a.data(TrapListModel::kTrapRole).toInt() < b.data(TrapListModel::kTrapRole).toInt();
  if (a.column() == TrapListModel::StateColumn)
    return a.data(TrapListModel::kStateRole).toInt() < b.data(TrapListModel::kStateRole).toInt();
  return a.data(Qt::EditRole).toDouble() < b.data(Qt::EditRole).toDouble();
}

}  // namespace budledger::ui
