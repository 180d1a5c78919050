#pragma once
// SignOffSummary: what a sign-off over a scope would approve, in numbers a PI
// can check before signing — per group the mothers, deaths, censorings,
// divisions and median lifespan; who made the decisions; and what is still
// open (undecided calls, traps nobody started, decisions a re-analysis could
// not carry over, traps the engine flagged). Plain data computed from the
// session and the journal; the dialog only shows it.
#include <QString>
#include <optional>
#include <vector>

#include "core/store/scope.h"
#include "ui/review_session.h"

namespace budledger::ui {

struct GroupCount {
  QString group;
  int traps = 0;
  int mothers = 0;
  int died = 0;
  int censored = 0;
  long divisions = 0;
  std::optional<double> medianLifespan;  // Kaplan–Meier median; none when not reached
};

struct Reviewer {
  QString name;
  QString role;
  int decisions = 0;
};

struct SignOffSummary {
  std::vector<GroupCount> groups;
  std::vector<Reviewer> reviewers;
  int traps = 0;
  int openCalls = 0;
  int tenuresWithoutDecision = 0;  // traps not started
  int carryOverItems = 0;
  int engineFlaggedTraps = 0;
  int lockedTraps = 0;  // already covered by an active sign-off
  bool hasOpenItems() const {
    return openCalls > 0 || tenuresWithoutDecision > 0 || carryOverItems > 0;
  }
};

SignOffSummary summariseForSignOff(ReviewSession& session, const store::Scope& scope);

}  // namespace budledger::ui
