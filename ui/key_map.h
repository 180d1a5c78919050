#pragma once
// KeyMap: every keyboard command of the workstation, its default keys and the
// user's own keys, kept in QSettings under "keys/<id>". The main window turns
// each command into a QAction; Help → Keyboard shortcuts lists and edits them.
// Invariant: commands() is fixed at build time, in display order; ids are
// stable strings (they are the settings keys), titles are translated.
#include <QKeySequence>
#include <QList>
#include <QObject>
#include <QSettings>
#include <vector>

namespace budledger::ui {

enum class Command {
  // Navigate
  NextFrame,
  PreviousFrame,
  NextFrameFast,
  PreviousFrameFast,
  FirstFrame,
  LastFrame,
  NextEvent,
  PreviousEvent,
  NextOpenEvent,
  PreviousOpenEvent,
  LaneUp,
  LaneDown,
  PageUp,
  PageDown,
  NextQueueItem,
  PreviousQueueItem,
  // View
  ZoomIn,
  ZoomOut,
  ZoomFit,
  ZoomCrops,
  AutoLevels,
  // Edit
  Accept,
  AcceptConfident,
  Reject,
  MoveEarlier,
  MoveLater,
  AddBud,
  AddSeparation,
  AddDeath,
  AddWashout,
  AddArrival,
  SetOutcome,
  AddNote,
  Undo,
  Redo,
};

enum class CommandGroup { Navigate, View, Edit };

struct CommandInfo {
  Command command;
  const char* id;  // settings key, e.g. "cursor.next-frame"
  CommandGroup group;
  QString title;
  QList<QKeySequence> defaults;
};

class KeyMap : public QObject {
  Q_OBJECT

 public:
  explicit KeyMap(QSettings& settings, QObject* parent = nullptr);

  static const std::vector<CommandInfo>& commands();
  static const CommandInfo& info(Command c);
  static QString groupTitle(CommandGroup g);

  QList<QKeySequence> keys(Command c) const;
  // Stores the user's keys (an empty list unbinds the command).
  void setKeys(Command c, const QList<QKeySequence>& keys);
  void resetToDefaults();
  // Commands other than `c` already bound to `key`.
  QList<Command> conflicts(Command c, const QKeySequence& key) const;
  static QString keysText(const QList<QKeySequence>& keys);  // "Right, Ctrl+F"

 signals:
  void changed();

 private:
  QSettings& settings_;
};

}  // namespace budledger::ui
