#pragma once
// ReviewSession: the open project as the workstation sees it — positions,
// traps, the current events of every trap with their decisions, and the
// lifespans they imply — plus typed change notifications for the views.
// It owns the store::Project. Everything it holds is rebuilt from the project
// file (proposals + journal); lifespans are recomputed once per change of a
// trap, never on repaint.
#include <QObject>
#include <QString>
#include <map>
#include <memory>
#include <optional>
#include <unordered_map>
#include <vector>

#include "core/lineage/lineage.h"
#include "core/store/project.h"
#include "ui/review_event.h"

namespace budledger::ui {

// Where a trap stands in review, derived from its events (and sign-offs).
enum class ReviewState : quint8 { NotStarted, InProgress, Reviewed, SignedOff };
QString reviewStateName(ReviewState s);

class ReviewSession : public QObject {
  Q_OBJECT

 public:
  // Opens a project file (read-only when `access` says so). Throws on failure.
  ReviewSession(const QString& path, store::Database::Access access, QObject* parent = nullptr);
  ~ReviewSession() override;

  store::Project& project() { return *project_; }
  QString path() const;
  bool readOnly() const { return project_->readOnly(); }

  const std::vector<store::PositionRecord>& positions() const { return positions_; }
  const store::PositionRecord* position(int id) const;
  const std::vector<store::TrapRecord>& traps(int position) const;
  std::vector<TrapId> allTraps() const;
  int frameCount(int position) const;
  // Minutes between frames, when the project records it.
  std::optional<double> intervalMinutes() const { return intervalMinutes_; }

  // Current events of a trap in frame order (empty when none).
  const std::vector<ReviewEvent>& events(TrapId trap) const;
  const ReviewEvent* event(std::int64_t id) const;
  // Tenures of one trap, and of every trap (cached; recomputed after changes).
  const std::vector<lineage::Tenure>& tenures(TrapId trap) const;
  ReviewState reviewState(TrapId trap) const;

  // The engine's per-frame readings of the latest run (cached per trap).
  const std::vector<store::MeasurementRecord>& measurements(TrapId trap) const;
  const std::vector<store::DriftRecord>& drift(int position) const;

 signals:
  // The events of one trap changed (edit, undo, redo, another view's action).
  void trapChanged(budledger::ui::TrapId trap);

 protected:
  void reloadTrap(TrapId trap);

 private:
  void loadAll();

  std::unique_ptr<store::Project> project_;
  std::vector<store::PositionRecord> positions_;
  std::map<int, std::vector<store::TrapRecord>> traps_;
  std::unordered_map<TrapId, std::vector<ReviewEvent>> events_;
  // Derived caches, filled on first use (hence mutable).
  mutable std::unordered_map<TrapId, std::vector<lineage::Tenure>> tenures_;
  mutable std::unordered_map<TrapId, std::vector<store::MeasurementRecord>> measurements_;
  mutable std::map<int, std::vector<store::DriftRecord>> drift_;
  std::optional<double> intervalMinutes_;
  std::optional<std::int64_t> run_;
};

}  // namespace budledger::ui
