#include "core/propose/cycle_model.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace budledger::propose {
namespace {

// Probability that an event with the given per-minute rate happens within one frame.
double perFrame(double perMin, double intervalMin) {
  return 1.0 - std::exp(-std::max(0.0, perMin) * intervalMin);
}

// Probability of leaving a geometric sojourn with the given mean (in minutes) in one frame.
double leaveProbability(double meanMin, double intervalMin) {
  const double meanFrames = std::max(1.0, meanMin / intervalMin);
  return std::clamp(1.0 / meanFrames, 1e-4, 1.0 - 1e-4);
}

}  // namespace

CycleModel::CycleModel(const CycleParams& p)
    : params_(p),
      m_(std::max(2, static_cast<int>(std::floor(p.minBuddedMin / p.intervalMin + 1e-9)))),
      k_(std::max(1, static_cast<int>(std::ceil(p.deathOnsetMin / p.intervalMin - 1e-9)))),
      // Where the chain has more than two ages, the first two stay single frames (they
      // are the groups BudNew and BudYoung, whose occupancy rows are learned as such).
      tail_(std::max(1, std::min(p.buddedTailStages, m_ - 2))),
      hmm_(m_ + 5 + k_) {
  if (!(p.intervalMin > 0)) throw std::invalid_argument("frame interval must be positive");
  const double dt = p.intervalMin;
  const double arrive = perFrame(p.arrivalPerMin, dt);
  const double wash = perFrame(p.washoutPerMin, dt);
  const double die = perFrame(p.deathPerMin, dt);
  const double gone = perFrame(p.deadGonePerMin, dt);
  const double bud = leaveProbability(p.meanUnbuddedMin, dt);
  // The budded time beyond the minimum is spread over the last `tail_` ages, each
  // left with the same probability (a sum of geometric stays, like an Erlang
  // duration), so its spread is 1/sqrt(tail) of its mean.
  const double extraFrames = std::max(0.0, p.meanBuddedExtraMin) / dt / tail_;
  const double sep = std::clamp(1.0 / (1.0 + extraFrames), 1e-4, 1.0 - 1e-4);
  const double rebud = std::clamp(p.immediateRebud, 0.0, 1.0);
  const double buddedArrival = std::clamp(p.arrivalBudded, 0.0, 1.0);

  using T = Transition;
  auto arc = [&](int from, int to, double prob, T tag) {
    hmm_.addArc(from, to, prob, static_cast<int>(tag));
  };
  // Empty (and just vacated): stay, or a mother arrives unbudded or with a bud of any age.
  for (int e : {0, vacatedState()}) {
    arc(e, 0, 1 - arrive, e == 0 ? T::Stay : T::Advance);
    arc(e, 1, arrive * (1 - buddedArrival), T::Arrival);
    for (int k = 1; k <= m_; ++k) arc(e, buddedState(k), arrive * buddedArrival / m_, T::Arrival);
  }
  // Unbudded live mother, and the frame just after a separation without a new bud.
  const double leaveLive = wash + die;
  arc(1, 1, (1 - leaveLive) * (1 - bud), T::Stay);
  arc(1, buddedState(1), (1 - leaveLive) * bud, T::Bud);
  arc(1, deadState(), die, T::Death);
  arc(1, vacatedState(), wash, T::Washout);
  const int j0 = separatedState(), j1 = separatedBudState();
  arc(j0, 1, (1 - leaveLive) * (1 - bud), T::Advance);
  arc(j0, buddedState(1), (1 - leaveLive) * bud, T::Bud);
  arc(j0, deadState(), die, T::Death);
  arc(j0, vacatedState(), wash, T::Washout);
  // Just separated with the next bud already showing: that bud is one frame old.
  arc(j1, buddedState(std::min(2, m_)), 1 - leaveLive, T::Advance);
  arc(j1, deadState(), die, T::Death);
  arc(j1, vacatedState(), wash, T::Washout);
  // Budded chain: forced advance through the first ages, then each of the last `tail_`
  // ages stays or moves on, the last to a separation.
  for (int k = 1; k <= m_; ++k) {
    const int s = buddedState(k);
    if (!inBuddedTail(s)) {
      arc(s, buddedState(k + 1), 1 - leaveLive, T::Advance);
    } else if (k < m_) {
      arc(s, s, (1 - leaveLive) * (1 - sep), T::Stay);
      arc(s, buddedState(k + 1), (1 - leaveLive) * sep, T::Advance);
    } else {
      arc(s, s, (1 - leaveLive) * (1 - sep), T::Stay);
      arc(s, j0, (1 - leaveLive) * sep * (1 - rebud), T::Separation);
      arc(s, j1, (1 - leaveLive) * sep * rebud, T::SeparationBud);
    }
    arc(s, deadState(), die, T::Death);
    arc(s, vacatedState(), wash, T::Washout);
  }
  // Dead mother: ages until the last dead state, stays until flushed out.
  for (int k = 1; k <= k_; ++k) {
    const int s = deadState(k);
    arc(s, k < k_ ? deadState(k + 1) : s, 1 - gone, k < k_ ? T::Advance : T::Stay);
    arc(s, vacatedState(), gone, T::DeadGone);
  }

  const double e0 = std::clamp(p.initialEmpty, 0.0, 1.0);
  const double d0 = std::clamp(p.initialDead, 0.0, 1.0 - e0);
  const double u0 = std::clamp(p.initialUnbudded, 0.0, 1.0 - e0 - d0);
  hmm_.setInitial(0, e0);
  hmm_.setInitial(1, u0);
  hmm_.setInitial(deadState(k_), d0);  // a corpse at the start has been dead a while
  const double b0 = (1.0 - e0 - d0 - u0) / m_;
  for (int k = 1; k <= m_; ++k) hmm_.setInitial(buddedState(k), b0);
  if (const std::string problem = hmm_.validate(); !problem.empty())
    throw std::logic_error("cycle model: " + problem);
}

int CycleModel::budAge(int state) const {
  if (state == separatedBudState()) return 1;
  return state >= 2 && state <= m_ + 1 ? state - 1 : 0;
}

int CycleModel::deadAge(int state) const {
  return state >= m_ + 2 && state <= m_ + 1 + k_ ? state - m_ - 1 : 0;
}

StateGroup CycleModel::group(int state) const {
  if (state == 0 || state == vacatedState()) return StateGroup::Empty;
  if (state == 1 || state == separatedState()) return StateGroup::Unbudded;
  if (isDead(state)) return StateGroup::Dead;
  const int age = budAge(state);
  if (age == 1) return StateGroup::BudNew;
  if (age == 2) return StateGroup::BudYoung;
  return StateGroup::BudOld;
}

std::string toString(Transition t) {
  switch (t) {
    case Transition::Stay:
      return "stay";
    case Transition::Advance:
      return "advance";
    case Transition::Arrival:
      return "arrival";
    case Transition::Bud:
      return "bud";
    case Transition::Separation:
      return "separation";
    case Transition::SeparationBud:
      return "separation+bud";
    case Transition::Death:
      return "death";
    case Transition::Washout:
      return "washout";
    case Transition::DeadGone:
      return "dead-gone";
  }
  return fmt::format("transition{}", static_cast<int>(t));
}

}  // namespace budledger::propose
