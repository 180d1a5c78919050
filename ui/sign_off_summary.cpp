#include "ui/sign_off_summary.h"

#include <map>

#include "core/stats/kaplan_meier.h"
#include "core/stats/quantiles.h"
#include "core/store/journal.h"
#include "core/store/materialised.h"

namespace budledger::ui {

SignOffSummary summariseForSignOff(ReviewSession& session, const store::Scope& scope) {
  SignOffSummary out;
  std::map<QString, GroupCount> groups;
  std::vector<stats::Lifespan> lifespans;
  for (const TrapId t : session.allTraps()) {
    if (!scope.covers({t.position, t.trap})) continue;
    ++out.traps;
    const auto* pos = session.position(t.position);
    const QString g = pos ? QString::fromStdString(pos->group) : QString();
    GroupCount& gc = groups[g];
    gc.group = g;
    ++gc.traps;
    for (const auto& ten : session.tenures(t)) {
      ++gc.mothers;
      (ten.outcome == Outcome::Death ? gc.died : gc.censored)++;
      gc.divisions += ten.divisions;
      lifespans.push_back({ten.divisions, ten.outcome == Outcome::Death, g.toStdString(), {}});
    }
    for (const auto& e : session.events(t)) out.openCalls += e.decision == Decision::Proposed;
    const ReviewState st = session.reviewState(t);
    out.tenuresWithoutDecision += st == ReviewState::NotStarted;
    out.lockedTraps += st == ReviewState::SignedOff;
    out.engineFlaggedTraps += !session.engineFlags(t).empty();
  }
  if (!lifespans.empty())
    for (const auto& curve : stats::kaplanMeierByGroup(stats::Cohort(lifespans))) {
      auto it = groups.find(QString::fromStdString(curve.group));
      if (it != groups.end()) it->second.medianLifespan = stats::median(curve).time;
    }
  for (auto& [g, c] : groups) out.groups.push_back(c);

  for (const auto& item : store::reviewItems(session.project().db()))
    if (scope.covers({item.state.position, item.state.trap})) ++out.carryOverItems;

  // Who decided what in the scope: every undoable edit, by the trap it touched.
  std::map<std::pair<std::string, std::string>, int> byPerson;
  for (const auto& e : store::readJournal(session.project().db())) {
    if (!store::isUndoableEdit(e.action)) continue;
    const auto target = store::parseTarget(e.target);
    if (!target) continue;
    std::optional<store::TrapRef> trap;
    if (target->kind == store::Target::Kind::Event) {
      if (const ReviewEvent* ev = session.event(target->id))
        trap = store::TrapRef{ev->event.position, ev->event.trap};
    } else if (target->kind == store::Target::Kind::Tenure ||
               target->kind == store::Target::Kind::Trap) {
      trap = store::TrapRef{target->position, target->trap};
    }
    if (trap && scope.covers(*trap)) ++byPerson[{e.actor, e.role}];
  }
  for (const auto& [who, n] : byPerson)
    out.reviewers.push_back(
        {QString::fromStdString(who.first), QString::fromStdString(who.second), n});
  return out;
}

}  // namespace budledger::ui
