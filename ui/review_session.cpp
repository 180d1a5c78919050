#include "ui/review_session.h"

#include <QCoreApplication>
#include <algorithm>

namespace budledger::ui {

QString reviewStateName(ReviewState s) {
  switch (s) {
    case ReviewState::NotStarted:
      return QCoreApplication::translate("budledger", "not started");
    case ReviewState::InProgress:
      return QCoreApplication::translate("budledger", "in progress");
    case ReviewState::Reviewed:
      return QCoreApplication::translate("budledger", "reviewed");
    case ReviewState::SignedOff:
      return QCoreApplication::translate("budledger", "signed off");
  }
  return {};
}

ReviewSession::ReviewSession(const QString& path, store::Database::Access access, QObject* parent)
    : QObject(parent),
      project_(std::make_unique<store::Project>(store::Project::open(path.toStdString(), access))) {
  loadAll();
}

ReviewSession::~ReviewSession() = default;

QString ReviewSession::path() const { return QString::fromStdString(project_->path()); }

void ReviewSession::loadAll() {
  positions_ = project_->positions();
  for (const auto& p : positions_) traps_[p.id] = project_->traps(p.id);
  if (auto v = project_->meta("interval_min")) {
    try {
      const double m = std::stod(*v);
      if (m > 0) intervalMinutes_ = m;
    } catch (const std::exception&) {
      // An unreadable interval only costs the clock labels; frames still show.
    }
  }
  if (auto run = project_->latestRun()) run_ = run->id;
  for (const Event& e : project_->proposals(run_)) {
    ReviewEvent re;
    re.event = e;
    re.decision = Decision::Proposed;
    events_[{e.position, e.trap}].push_back(re);
  }
  for (auto& [trap, list] : events_)
    std::stable_sort(list.begin(), list.end(), [](const ReviewEvent& a, const ReviewEvent& b) {
      return a.event.frame < b.event.frame;
    });
}

void ReviewSession::reloadTrap(TrapId trap) {
  tenures_.erase(trap);
  emit trapChanged(trap);
}

const store::PositionRecord* ReviewSession::position(int id) const {
  for (const auto& p : positions_)
    if (p.id == id) return &p;
  return nullptr;
}

const std::vector<store::TrapRecord>& ReviewSession::traps(int position) const {
  static const std::vector<store::TrapRecord> kNone;
  auto it = traps_.find(position);
  return it == traps_.end() ? kNone : it->second;
}

std::vector<TrapId> ReviewSession::allTraps() const {
  std::vector<TrapId> out;
  for (const auto& [pos, list] : traps_)
    for (const auto& t : list) out.push_back({pos, t.trap});
  return out;
}

int ReviewSession::frameCount(int positionId) const {
  const auto* p = position(positionId);
  return p ? p->frameCount : 0;
}

const std::vector<ReviewEvent>& ReviewSession::events(TrapId trap) const {
  static const std::vector<ReviewEvent> kNone;
  auto it = events_.find(trap);
  return it == events_.end() ? kNone : it->second;
}

const ReviewEvent* ReviewSession::event(std::int64_t id) const {
  for (const auto& [trap, list] : events_)
    for (const auto& e : list)
      if (e.event.id == id) return &e;
  return nullptr;
}

const std::vector<lineage::Tenure>& ReviewSession::tenures(TrapId trap) const {
  auto it = tenures_.find(trap);
  if (it != tenures_.end()) return it->second;
  std::vector<Event> counted;
  for (const auto& e : events(trap))
    if (e.counts()) counted.push_back(e.event);
  auto result = lineage::tenuresFromEvents(std::move(counted), frameCount(trap.position));
  return tenures_.emplace(trap, std::move(result.tenures)).first->second;
}

ReviewState ReviewSession::reviewState(TrapId trap) const {
  const auto& list = events(trap);
  const auto open = std::count_if(list.begin(), list.end(), [](const ReviewEvent& e) {
    return e.decision == Decision::Proposed;
  });
  const auto decided = static_cast<long>(list.size()) - open;
  if (decided == 0) return ReviewState::NotStarted;
  return open == 0 ? ReviewState::Reviewed : ReviewState::InProgress;
}

const std::vector<store::MeasurementRecord>& ReviewSession::measurements(TrapId trap) const {
  auto it = measurements_.find(trap);
  if (it != measurements_.end()) return it->second;
  std::vector<store::MeasurementRecord> rows;
  if (run_) rows = project_->measurements(*run_, trap.position, trap.trap);
  return measurements_.emplace(trap, std::move(rows)).first->second;
}

const std::vector<store::DriftRecord>& ReviewSession::drift(int positionId) const {
  auto it = drift_.find(positionId);
  if (it != drift_.end()) return it->second;
  return drift_.emplace(positionId, project_->drift(positionId)).first->second;
}

}  // namespace budledger::ui
