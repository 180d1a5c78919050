#pragma once
// EditCommands: turns the edit commands of the key map (accept, delete, move,
// add, outcome, note, undo, redo, accept-confident) and drags in the strips
// into ReviewSession edits at the strips' cursor, and says what each did.
// It never touches the journal itself: the session's Editor records every
// edit; a refusal (read-only, signed off, nothing there) is reported, not
// thrown. It asks who is reviewing once, before the first edit.
#include <QObject>
#include <QSettings>
#include <functional>
#include <optional>

#include "ui/key_map.h"
#include "ui/review_session.h"

class QWidget;

namespace budledger::ui {

class TimeStripView;

class EditCommands : public QObject {
  Q_OBJECT

 public:
  // Accept-all takes proposals at or above this confidence.
  static constexpr double kConfident = 0.9;

  EditCommands(QSettings& settings, TimeStripView* strips, QWidget* dialogParent);
  void setSession(ReviewSession* session);

  // Runs an edit command; returns false when it did nothing (and says why).
  bool run(Command c);
  bool moveTo(std::int64_t eventId, int frame);
  // Makes sure an identity is set (asking when needed); false when the user declined.
  bool ensureIdentity();

 signals:
  void said(const QString& message);

 private:
  // Runs one session call, turning refusals into a message; returns whether it recorded.
  bool attempt(const std::function<store::Change()>& edit);
  const ReviewEvent* target() const;
  bool addAtCursor(EventKind kind);
  bool setOutcomeAtCursor();
  bool noteAtCursor();

  QSettings& settings_;
  TimeStripView* strips_;
  QWidget* parent_;
  ReviewSession* session_ = nullptr;
};

}  // namespace budledger::ui
