#pragma once
// ReviewSession: the open project as the workstation sees it — positions,
// traps, the current events of every trap with their decisions, the
// lifespans they imply, sign-offs — and the one door for edits. It owns the
// store::Project and its store::Editor: widgets call accept(), move(), … and
// never build journal entries or undo records; every call is one committed
// journal entry (or a refusal that changes nothing). After each recorded
// change the session reloads only the traps the change names, recomputes
// their lifespans once, and emits trapChanged() per trap, then edited().
// Everything it holds is rebuilt from the project file.
#include <QObject>
#include <QString>
#include <map>
#include <memory>
#include <optional>
#include <unordered_map>
#include <vector>

#include "core/lineage/lineage.h"
#include "core/store/editor.h"
#include "core/store/project.h"
#include "core/store/replay.h"
#include "ui/review_event.h"

namespace budledger::ui {

// Where a trap stands in review, derived from its events and sign-offs.
enum class ReviewState : quint8 { NotStarted, InProgress, Reviewed, SignedOff };
QString reviewStateName(ReviewState s);

class ReviewSession : public QObject {
  Q_OBJECT

 public:
  // Opens a project file. ReadWrite falls back to read-only when another
  // program holds the project (readOnlyReason() says who). Throws on failure.
  ReviewSession(const QString& path, store::Database::Access access, QObject* parent = nullptr);
  ~ReviewSession() override;

  store::Project& project() { return *project_; }
  QString path() const;
  bool readOnly() const { return project_->readOnly(); }
  QString readOnlyReason() const { return QString::fromStdString(project_->readOnlyReason()); }

  const std::vector<store::PositionRecord>& positions() const { return positions_; }
  const store::PositionRecord* position(int id) const;
  const std::vector<store::TrapRecord>& traps(int position) const;
  std::vector<TrapId> allTraps() const;
  int frameCount(int position) const;
  // Minutes between frames, when the project records it.
  std::optional<double> intervalMinutes() const { return intervalMinutes_; }
  // Micrometres per pixel of a position, when recorded.
  std::optional<double> pixelUm(int position) const;

  // Current events of a trap in frame order (empty when none).
  const std::vector<ReviewEvent>& events(TrapId trap) const;
  const ReviewEvent* event(std::int64_t id) const;
  // Tenures of one trap with people's outcome overrides applied (cached;
  // recomputed once after a change of the trap).
  const std::vector<lineage::Tenure>& tenures(TrapId trap) const;
  ReviewState reviewState(TrapId trap) const;
  // Active sign-offs, and whether one covers a trap (its edits are refused).
  std::vector<store::SignOffRecord> activeSignOffs() const;
  bool locked(TrapId trap) const;

  // The engine's per-frame readings of the latest run (cached per trap).
  const std::vector<store::MeasurementRecord>& measurements(TrapId trap) const;
  const std::vector<store::DriftRecord>& drift(int position) const;
  // Per-trap flags the engine raised for review ("crowded-throughout", …).
  std::vector<QString> engineFlags(TrapId trap) const;

  // ---- edits (each one journal entry; EditRefused when not allowed) -------
  void setActor(const store::Actor& actor) { actor_ = actor; }
  const store::Actor& actor() const { return actor_; }
  store::Change accept(std::int64_t eventId, const QString& reason = {});
  store::Change reject(std::int64_t eventId, const QString& reason = {});
  store::Change move(std::int64_t eventId, int frame, const QString& reason = {});
  store::Change add(TrapId trap, int frame, EventKind kind, const QString& reason = {});
  store::Change setOutcome(TrapId trap, int mother, Outcome outcome, const QString& reason = {});
  store::Change note(const store::Target& target, const QString& text, const QString& reason);
  store::Change undo();
  store::Change redo();
  store::Change signOff(const store::Scope& scope, store::SignMeaning meaning,
                        const QString& reason);
  store::Change revoke(std::int64_t signOffId, const QString& reason);
  // Accepts, one journal entry each, the trap's proposals whose confidence is
  // at least `minConfidence`; returns how many were accepted.
  int acceptConfident(TrapId trap, double minConfidence, const QString& reason = {});
  // What undo / redo would do next, in words (empty when nothing).
  QString nextUndo() const;
  QString nextRedo() const;

 signals:
  // The events, outcomes or sign-off state of one trap changed.
  void trapChanged(budledger::ui::TrapId trap);
  // A change was recorded (after the trapChanged signals it caused).
  void edited(const QString& summary, std::int64_t seq);

 private:
  void loadAll();
  void reloadTrap(TrapId trap);
  void afterChange(const store::Change& change);
  store::Editor& editor();

  std::unique_ptr<store::Project> project_;
  std::unique_ptr<store::Editor> editor_;
  store::Actor actor_;
  std::vector<store::PositionRecord> positions_;
  std::map<int, std::vector<store::TrapRecord>> traps_;
  std::unordered_map<TrapId, std::vector<ReviewEvent>> events_;
  std::map<store::TenureKey, store::OutcomeOverride> overrides_;
  std::vector<store::SignOffRecord> signOffs_;
  std::optional<double> intervalMinutes_;
  std::map<int, std::int64_t> runOfPosition_;  // position id → last run that analysed it
  std::map<TrapId, std::vector<QString>> engineFlags_;
  // Derived caches, filled on first use (hence mutable).
  mutable std::unordered_map<TrapId, std::vector<lineage::Tenure>> tenures_;
  mutable std::unordered_map<TrapId, std::vector<store::MeasurementRecord>> measurements_;
  mutable std::map<int, std::vector<store::DriftRecord>> drift_;
};

}  // namespace budledger::ui
