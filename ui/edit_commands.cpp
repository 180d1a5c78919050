#include "ui/edit_commands.h"

#include <QApplication>
#include <QCursor>
#include <QMenu>
#include <QMessageBox>

#include "core/store/lifespans.h"
#include "ui/identity.h"
#include "ui/note_dialog.h"
#include "ui/time_strip_view.h"

namespace budledger::ui {

EditCommands::EditCommands(QSettings& settings, TimeStripView* strips, QWidget* dialogParent)
    : QObject(dialogParent), settings_(settings), strips_(strips), parent_(dialogParent) {}

void EditCommands::setSession(ReviewSession* session) {
  session_ = session;
  if (session_) {
    const Identity id = Identity::load(settings_);
    if (id.complete()) session_->setActor({id.name.toStdString(), id.role.toStdString()});
  }
}

bool EditCommands::ensureIdentity() {
  if (!session_) return false;
  Identity id = Identity::load(settings_);
  if (!id.complete()) {
    IdentityDialog dialog(id,
                          tr("Every decision is recorded in the project's journal with the name "
                             "and role of the person who made it."),
                          parent_);
    if (dialog.exec() != QDialog::Accepted) return false;
    id = dialog.identity();
    id.save(settings_);
  }
  session_->setActor({id.name.toStdString(), id.role.toStdString()});
  return true;
}

bool EditCommands::attempt(const std::function<store::Change()>& edit) {
  if (!session_) return false;
  if (session_->readOnly()) {
    emit said(tr("Read-only: %1").arg(session_->readOnlyReason()));
    QApplication::beep();
    return false;
  }
  if (!ensureIdentity()) {
    emit said(tr("Not recorded: no reviewer name given"));
    return false;
  }
  try {
    const store::Change c = edit();
    if (!c.recorded()) {
      emit said(tr("Nothing to change"));
      return false;
    }
    emit said(QString::fromStdString(c.summary));
    return true;
  } catch (const store::EditRefused& e) {
    emit said(tr("Not done: %1").arg(QString::fromStdString(e.what())));
    QApplication::beep();
  } catch (const std::exception& e) {
    // Anything else is a fault (disk full, file changed behind our back): say it loudly.
    QMessageBox::critical(parent_, tr("The edit was not recorded"),
                          QString::fromStdString(e.what()));
  }
  return false;
}

const ReviewEvent* EditCommands::target() const {
  if (!session_) return nullptr;
  if (auto id = strips_->selectedEvent())
    if (const ReviewEvent* e = session_->event(*id)) return e;
  return strips_->eventAtCursor();
}

bool EditCommands::run(Command c) {
  if (!session_) return false;
  auto trap = strips_->currentTrap();
  switch (c) {
    case Command::Accept:
    case Command::Reject: {
      const ReviewEvent* e = target();
      if (!e) {
        emit said(tr("No event at the cursor"));
        return false;
      }
      const std::int64_t id = e->event.id;
      const bool ok = attempt(
          [&] { return c == Command::Accept ? session_->accept(id) : session_->reject(id); });
      if (ok) strips_->selectEvent(id);
      return ok;
    }
    case Command::MoveEarlier:
    case Command::MoveLater: {
      const ReviewEvent* e = target();
      if (!e) {
        emit said(tr("No event at the cursor"));
        return false;
      }
      return moveTo(e->event.id, e->event.frame + (c == Command::MoveLater ? 1 : -1));
    }
    case Command::AddBud:
      return addAtCursor(EventKind::Bud);
    case Command::AddSeparation:
      return addAtCursor(EventKind::Separation);
    case Command::AddDeath:
      return addAtCursor(EventKind::Death);
    case Command::AddWashout:
      return addAtCursor(EventKind::Washout);
    case Command::AddArrival:
      return addAtCursor(EventKind::Arrival);
    case Command::SetOutcome:
      return setOutcomeAtCursor();
    case Command::AddNote:
      return noteAtCursor();
    case Command::Undo:
      return attempt([&] { return session_->undo(); });
    case Command::Redo:
      return attempt([&] { return session_->redo(); });
    case Command::AcceptConfident: {
      if (!trap) return false;
      if (session_->readOnly() || !ensureIdentity()) return attempt([] { return store::Change{}; });
      int n = 0;
      try {
        n = session_->acceptConfident(*trap, kConfident);
      } catch (const store::EditRefused& e) {
        emit said(tr("Not done: %1").arg(QString::fromStdString(e.what())));
        QApplication::beep();
        return false;
      }
      emit said(n == 0 ? tr("No undecided call of trap %1 is %2% confident or more")
                             .arg(trap->trap)
                             .arg(std::lround(kConfident * 100))
                       : tr("Accepted %1 call(s) of trap %2 at %3% confidence or more, one "
                            "journal entry each")
                             .arg(n)
                             .arg(trap->trap)
                             .arg(std::lround(kConfident * 100)));
      return n > 0;
    }
    default:
      return false;
  }
}

bool EditCommands::moveTo(std::int64_t eventId, int frame) {
  const int last = strips_->axis().frameCount() - 1;
  if (frame < 0 || frame > last) {
    emit said(tr("Cannot move outside the movie (frames 0–%1)").arg(last));
    return false;
  }
  const bool ok = attempt([&] { return session_->move(eventId, frame); });
  if (ok) {
    strips_->setCursor(strips_->cursorLane(), frame);
    strips_->selectEvent(eventId);
  }
  return ok;
}

bool EditCommands::addAtCursor(EventKind kind) {
  auto trap = strips_->currentTrap();
  if (!trap) return false;
  const int frame = strips_->cursorFrame();
  std::int64_t added = 0;
  const bool ok = attempt([&] {
    auto c = session_->add(*trap, frame, kind);
    added = -c.seq;  // an added event's id is minus its entry's seq (current_event.h)
    return c;
  });
  if (ok) strips_->selectEvent(added);
  return ok;
}

bool EditCommands::setOutcomeAtCursor() {
  auto trap = strips_->currentTrap();
  if (!trap) return false;
  const auto& tenures = session_->tenures(*trap);
  const auto mother = store::motherOf(tenures, strips_->cursorFrame());
  if (!mother) {
    emit said(tr("No mother's tenure at the cursor"));
    return false;
  }
  QMenu menu(parent_);
  menu.setObjectName(QStringLiteral("outcomeMenu"));
  menu.addSection(tr("Mother %1 of trap %2 ended by").arg(*mother + 1).arg(trap->trap));
  const std::pair<Outcome, QString> choices[] = {
      {Outcome::Death, tr("&Death")},
      {Outcome::Washout, tr("&Washout (censored)")},
      {Outcome::EndOfImaging, tr("&End of imaging (censored)")}};
  for (const auto& [o, label] : choices) menu.addAction(label)->setData(static_cast<int>(o));
  QAction* chosen = menu.exec(QCursor::pos());
  if (!chosen) return false;
  const auto outcome = static_cast<Outcome>(chosen->data().toInt());
  return attempt([&] { return session_->setOutcome(*trap, *mother, outcome); });
}

bool EditCommands::noteAtCursor() {
  auto trap = strips_->currentTrap();
  if (!trap) return false;
  QList<QPair<NoteDialog::About, QString>> targets;
  const ReviewEvent* e = target();
  if (e)
    targets.append({NoteDialog::About::Event,
                    tr("this %1 (frame %2)").arg(kindName(e->event.kind)).arg(e->event.frame)});
  const auto mother = store::motherOf(session_->tenures(*trap), strips_->cursorFrame());
  if (mother)
    targets.append({NoteDialog::About::Tenure, tr("mother %1's tenure").arg(*mother + 1)});
  targets.append({NoteDialog::About::Trap, tr("trap %1").arg(trap->trap)});
  NoteDialog dialog(targets, parent_);
  if (dialog.exec() != QDialog::Accepted) return false;
  store::Target t = store::Target::trapOf(trap->position, trap->trap);
  if (dialog.about() == NoteDialog::About::Event && e) t = store::Target::event(e->event.id);
  if (dialog.about() == NoteDialog::About::Tenure && mother)
    t = store::Target::tenure(trap->position, trap->trap, *mother);
  return attempt([&] { return session_->note(t, dialog.text(), dialog.reason()); });
}

}  // namespace budledger::ui
