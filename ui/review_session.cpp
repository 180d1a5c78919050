#include "ui/review_session.h"

#include <nlohmann/json.hpp>

#include <QCoreApplication>
#include <algorithm>

#include "core/store/lifespans.h"
#include "core/store/materialised.h"

namespace budledger::ui {

namespace {

Decision decisionOf(store::EventStatus s) {
  switch (s) {
    case store::EventStatus::Proposed:
      return Decision::Proposed;
    case store::EventStatus::Accepted:
      return Decision::Accepted;
    case store::EventStatus::Moved:
      return Decision::Moved;
    case store::EventStatus::Added:
      return Decision::Added;
    case store::EventStatus::Rejected:
      return Decision::Rejected;
  }
  return Decision::Proposed;
}

store::EventStatus statusOf(Decision d) {
  switch (d) {
    case Decision::Proposed:
      return store::EventStatus::Proposed;
    case Decision::Accepted:
      return store::EventStatus::Accepted;
    case Decision::Moved:
      return store::EventStatus::Moved;
    case Decision::Added:
      return store::EventStatus::Added;
    case Decision::Rejected:
      return store::EventStatus::Rejected;
  }
  return store::EventStatus::Proposed;
}

ReviewEvent fromCurrent(const store::CurrentEvent& c) {
  ReviewEvent e;
  e.event = c.event;
  e.decision = decisionOf(c.status);
  if (c.status == store::EventStatus::Moved) e.proposedFrame = c.proposedFrame;
  return e;
}

void sortByFrame(std::vector<ReviewEvent>& list) {
  std::stable_sort(list.begin(), list.end(), [](const ReviewEvent& a, const ReviewEvent& b) {
    return a.event.frame < b.event.frame;
  });
}

std::string text(const QString& s) { return s.toStdString(); }

QString describe(const store::JournalEntry& e) {
  return QStringLiteral("%1 %2").arg(QString::fromStdString(std::string(toString(e.action))),
                                     QString::fromStdString(e.target));
}

}  // namespace

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

ReviewSession::~ReviewSession() {
  editor_.reset();  // before the project it refers to
}

QString ReviewSession::path() const { return QString::fromStdString(project_->path()); }

void ReviewSession::loadAll() {
  positions_ = project_->positions();
  for (const auto& p : positions_) traps_[p.id] = project_->traps(p.id);
  if (auto v = project_->meta(store::kMetaIntervalMin)) {
    try {
      const double m = std::stod(*v);
      if (m > 0) intervalMinutes_ = m;
    } catch (const std::exception&) {
      // An unreadable interval only costs the clock labels; frames still show.
    }
  }
  // Each position's flags and measurements come from the last run that
  // analysed it: a project grown by several analyses has one run per analysis.
  for (const auto& run : project_->runs()) {
    try {
      const auto params = nlohmann::json::parse(run.parametersJson);
      if (!params.contains("positions")) {  // a run that names no positions covers them all
        for (const auto& p : positions_) runOfPosition_[p.id] = run.id;
        continue;
      }
      for (const auto& p : params["positions"]) {
        const int position = p.value("position", 0);
        runOfPosition_[position] = run.id;
        std::erase_if(engineFlags_, [&](const auto& kv) { return kv.first.position == position; });
        for (const auto& f : p.value("trap_flags", nlohmann::json::array()))
          engineFlags_[{position, f.value("trap", 0)}].push_back(
              QString::fromStdString(f.value("reason", std::string())));
      }
    } catch (const std::exception&) {
      // Flags are a help for ordering the queue; a run without them is fine.
    }
  }
  for (const auto& c : store::currentEvents(project_->db()))
    events_[{c.event.position, c.event.trap}].push_back(fromCurrent(c));
  for (auto& [trap, list] : events_) sortByFrame(list);
  overrides_ = store::outcomeOverrides(project_->db());
  signOffs_ = store::signOffs(project_->db());
  // Made up front so that undo and redo reach back into earlier sessions' edits.
  if (!project_->readOnly()) editor_ = std::make_unique<store::Editor>(*project_);
}

store::Editor& ReviewSession::editor() {
  project_->requireWritable();
  if (!editor_) editor_ = std::make_unique<store::Editor>(*project_);
  return *editor_;
}

void ReviewSession::reloadTrap(TrapId trap) {
  auto& list = events_[trap];
  list.clear();
  for (const auto& c :
       store::currentEvents(project_->db(), store::TrapRef{trap.position, trap.trap}))
    list.push_back(fromCurrent(c));
  sortByFrame(list);
  tenures_.erase(trap);
}

void ReviewSession::afterChange(const store::Change& change) {
  if (!change.recorded()) return;
  overrides_ = store::outcomeOverrides(project_->db());
  signOffs_ = store::signOffs(project_->db());
  std::vector<TrapId> touched;
  for (const auto& t : change.traps) touched.push_back({t.position, t.trap});
  // A sign-off or revocation over a position or the experiment changes the
  // lock of every trap it covers, though it names none.
  if (change.action == store::JournalAction::SignOff ||
      change.action == store::JournalAction::Revoke)
    if (touched.empty()) touched = allTraps();
  for (const TrapId t : touched) reloadTrap(t);
  for (const TrapId t : touched) emit trapChanged(t);
  emit edited(QString::fromStdString(change.summary), change.seq);
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
  std::vector<store::CurrentEvent> current;
  for (const auto& e : events(trap)) {
    store::CurrentEvent c;
    c.event = e.event;
    c.status = statusOf(e.decision);
    current.push_back(c);
  }
  auto list = store::tenuresInScope(current, overrides_, positions_,
                                    store::Scope::ofTrap(trap.position, trap.trap));
  return tenures_.emplace(trap, std::move(list)).first->second;
}

std::vector<store::SignOffRecord> ReviewSession::activeSignOffs() const {
  std::vector<store::SignOffRecord> out;
  for (const auto& s : signOffs_)
    if (s.active()) out.push_back(s);
  return out;
}

bool ReviewSession::locked(TrapId trap) const {
  return std::any_of(signOffs_.begin(), signOffs_.end(), [&](const store::SignOffRecord& s) {
    return s.active() && s.scope.covers({trap.position, trap.trap});
  });
}

ReviewState ReviewSession::reviewState(TrapId trap) const {
  if (locked(trap)) return ReviewState::SignedOff;
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
  if (auto run = runOfPosition_.find(trap.position); run != runOfPosition_.end())
    rows = project_->measurements(run->second, trap.position, trap.trap);
  return measurements_.emplace(trap, std::move(rows)).first->second;
}

const std::vector<store::DriftRecord>& ReviewSession::drift(int positionId) const {
  auto it = drift_.find(positionId);
  if (it != drift_.end()) return it->second;
  return drift_.emplace(positionId, project_->drift(positionId)).first->second;
}

std::optional<double> ReviewSession::pixelUm(int positionId) const {
  const auto* pos = position(positionId);
  std::optional<std::string> v;
  if (pos) v = project_->meta("position." + pos->name + "." + store::kMetaPixelUm);
  if (!v) v = project_->meta(store::kMetaPixelUm);
  if (!v) return std::nullopt;
  try {
    const double um = std::stod(*v);
    return um > 0 ? std::optional(um) : std::nullopt;
  } catch (const std::exception&) {
    return std::nullopt;
  }
}

std::vector<QString> ReviewSession::engineFlags(TrapId trap) const {
  auto it = engineFlags_.find(trap);
  return it == engineFlags_.end() ? std::vector<QString>{} : it->second;
}

// ---- edits ------------------------------------------------------------------

store::Change ReviewSession::accept(std::int64_t id, const QString& reason) {
  const auto c = editor().accept(actor_, id, text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::reject(std::int64_t id, const QString& reason) {
  const auto c = editor().reject(actor_, id, text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::move(std::int64_t id, int frame, const QString& reason) {
  const auto c = editor().move(actor_, id, frame, text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::add(TrapId trap, int frame, EventKind kind, const QString& reason) {
  const auto c =
      editor().add(actor_, store::TrapRef{trap.position, trap.trap}, frame, kind, text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::setOutcome(TrapId trap, int mother, Outcome outcome,
                                        const QString& reason) {
  const auto c = editor().setOutcome(actor_, store::TenureKey{trap.position, trap.trap, mother},
                                     outcome, text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::note(const store::Target& target, const QString& body,
                                  const QString& reason) {
  const auto c = editor().note(actor_, target, text(body), text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::undo() {
  const auto c = editor().undo(actor_);
  afterChange(c);
  return c;
}

store::Change ReviewSession::redo() {
  const auto c = editor().redo(actor_);
  afterChange(c);
  return c;
}

store::Change ReviewSession::signOff(const store::Scope& scope, store::SignMeaning meaning,
                                     const QString& reason) {
  const auto c = editor().signOff(actor_, scope, meaning, text(reason));
  afterChange(c);
  return c;
}

store::Change ReviewSession::revoke(std::int64_t signOffId, const QString& reason) {
  const auto c = editor().revoke(actor_, signOffId, text(reason));
  afterChange(c);
  return c;
}

int ReviewSession::acceptConfident(TrapId trap, double minConfidence, const QString& reason) {
  std::vector<std::int64_t> ids;
  for (const auto& e : events(trap))
    if (e.decision == Decision::Proposed && e.event.confidence >= minConfidence)
      ids.push_back(e.event.id);
  int n = 0;
  for (const auto id : ids) n += accept(id, reason).recorded() ? 1 : 0;
  return n;
}

QString ReviewSession::nextUndo() const {
  if (readOnly() || !editor_) return {};
  const auto e = editor_->nextUndo();
  return e ? describe(*e) : QString();
}

QString ReviewSession::nextRedo() const {
  if (readOnly() || !editor_) return {};
  const auto e = editor_->nextRedo();
  return e ? describe(*e) : QString();
}

}  // namespace budledger::ui
