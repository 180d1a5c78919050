#include "ui/key_map.h"

#include <QCoreApplication>
#include <algorithm>

namespace budledger::ui {

namespace {

QString t(const char* s) { return QCoreApplication::translate("KeyMap", s); }
QKeySequence k(const char* s) { return QKeySequence(QString::fromLatin1(s)); }

std::vector<CommandInfo> buildCommands() {
  using C = Command;
  using G = CommandGroup;
  return {
      {C::NextFrame, "cursor.next-frame", G::Navigate, t("Next frame"), {k("Right")}},
      {C::PreviousFrame, "cursor.previous-frame", G::Navigate, t("Previous frame"), {k("Left")}},
      {C::NextFrameFast,
       "cursor.forward-10",
       G::Navigate,
       t("Forward 10 frames"),
       {k("Shift+Right")}},
      {C::PreviousFrameFast, "cursor.back-10", G::Navigate, t("Back 10 frames"), {k("Shift+Left")}},
      {C::FirstFrame, "cursor.first-frame", G::Navigate, t("First frame"), {k("Home")}},
      {C::LastFrame, "cursor.last-frame", G::Navigate, t("Last frame"), {k("End")}},
      {C::NextEvent, "cursor.next-event", G::Navigate, t("Next event in trap"), {k("]")}},
      {C::PreviousEvent,
       "cursor.previous-event",
       G::Navigate,
       t("Previous event in trap"),
       {k("[")}},
      {C::NextOpenEvent,
       "cursor.next-open-event",
       G::Navigate,
       t("Next undecided event in trap"),
       {k(".")}},
      {C::PreviousOpenEvent,
       "cursor.previous-open-event",
       G::Navigate,
       t("Previous undecided event in trap"),
       {k(",")}},
      {C::LaneUp, "cursor.trap-up", G::Navigate, t("Trap above"), {k("Up")}},
      {C::LaneDown, "cursor.trap-down", G::Navigate, t("Trap below"), {k("Down")}},
      {C::PageUp, "cursor.page-up", G::Navigate, t("Five traps up"), {k("PgUp")}},
      {C::PageDown, "cursor.page-down", G::Navigate, t("Five traps down"), {k("PgDown")}},
      {C::NextQueueItem, "queue.next", G::Navigate, t("Next item needing review"), {k("Q")}},
      {C::PreviousQueueItem,
       "queue.previous",
       G::Navigate,
       t("Previous item needing review"),
       {k("Shift+Q")}},
      {C::ZoomIn, "view.zoom-in", G::View, t("Zoom in"), {k("+"), k("=")}},
      {C::ZoomOut, "view.zoom-out", G::View, t("Zoom out"), {k("-")}},
      {C::ZoomFit, "view.zoom-fit", G::View, t("Whole movie in view"), {k("0")}},
      {C::ZoomCrops, "view.zoom-crops", G::View, t("Crops at full size"), {k("1")}},
      {C::AutoLevels, "view.auto-levels", G::View, t("Auto levels from current trap"), {k("L")}},
      {C::Accept, "edit.accept", G::Edit, t("Accept event at cursor"), {k("Return"), k("Enter")}},
      {C::AcceptConfident,
       "edit.accept-confident",
       G::Edit,
       t("Accept remaining confident events of trap"),
       {k("Shift+Return")}},
      {C::Reject,
       "edit.reject",
       G::Edit,
       t("Delete (reject) event at cursor"),
       {k("Del"), k("Backspace")}},
      {C::MoveEarlier,
       "edit.move-earlier",
       G::Edit,
       t("Move event one frame earlier"),
       {k("Ctrl+Left")}},
      {C::MoveLater,
       "edit.move-later",
       G::Edit,
       t("Move event one frame later"),
       {k("Ctrl+Right")}},
      {C::AddBud, "edit.add-bud", G::Edit, t("Add bud at cursor"), {k("B")}},
      {C::AddSeparation, "edit.add-separation", G::Edit, t("Add separation at cursor"), {k("S")}},
      {C::AddDeath, "edit.add-death", G::Edit, t("Add death at cursor"), {k("D")}},
      {C::AddWashout, "edit.add-washout", G::Edit, t("Add washout at cursor"), {k("W")}},
      {C::AddArrival, "edit.add-arrival", G::Edit, t("Add arrival at cursor"), {k("A")}},
      {C::SetOutcome, "edit.set-outcome", G::Edit, t("Set outcome of tenure at cursor"), {k("O")}},
      {C::AddNote, "edit.note", G::Edit, t("Add a note with a reason"), {k("N")}},
      {C::Undo, "edit.undo", G::Edit, t("Undo"), {QKeySequence(QKeySequence::Undo)}},
      {C::Redo, "edit.redo", G::Edit, t("Redo"), {k("Ctrl+Shift+Z"), k("Ctrl+Y")}},
  };
}

}  // namespace

KeyMap::KeyMap(QSettings& settings, QObject* parent) : QObject(parent), settings_(settings) {}

const std::vector<CommandInfo>& KeyMap::commands() {
  static const std::vector<CommandInfo> kCommands = buildCommands();
  return kCommands;
}

const CommandInfo& KeyMap::info(Command c) {
  const auto& all = commands();
  return *std::find_if(all.begin(), all.end(),
                       [c](const CommandInfo& i) { return i.command == c; });
}

QString KeyMap::groupTitle(CommandGroup g) {
  switch (g) {
    case CommandGroup::Navigate:
      return t("Navigate");
    case CommandGroup::View:
      return t("View");
    case CommandGroup::Edit:
      return t("Edit");
  }
  return {};
}

QList<QKeySequence> KeyMap::keys(Command c) const {
  const CommandInfo& i = info(c);
  const QString key = QStringLiteral("keys/") + QString::fromLatin1(i.id);
  if (!settings_.contains(key)) return i.defaults;
  QList<QKeySequence> out;
  for (const QString& s : settings_.value(key).toStringList())
    if (!s.isEmpty()) out << QKeySequence::fromString(s, QKeySequence::PortableText);
  return out;
}

void KeyMap::setKeys(Command c, const QList<QKeySequence>& keys) {
  QStringList list;
  for (const auto& k : keys)
    if (!k.isEmpty()) list << k.toString(QKeySequence::PortableText);
  settings_.setValue(QStringLiteral("keys/") + QString::fromLatin1(info(c).id), list);
  emit changed();
}

void KeyMap::resetToDefaults() {
  settings_.remove(QStringLiteral("keys"));
  emit changed();
}

QList<Command> KeyMap::conflicts(Command c, const QKeySequence& key) const {
  QList<Command> out;
  if (key.isEmpty()) return out;
  for (const auto& i : commands())
    if (i.command != c && keys(i.command).contains(key)) out << i.command;
  return out;
}

QString KeyMap::keysText(const QList<QKeySequence>& keys) {
  QStringList parts;
  for (const auto& k : keys) parts << k.toString(QKeySequence::NativeText);
  return parts.join(QStringLiteral(", "));
}

}  // namespace budledger::ui
