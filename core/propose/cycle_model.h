#pragma once
// CycleModel: the hidden states of one trap over time and how they may follow
// one another. A trap is empty, or holds a live mother that is unbudded or
// budded, or holds a dead mother. The budded phase is a chain of
// `buddedFrames()` states (a division takes at least ~45 min, common
// practice), the last `buddedTailStages()` of which may repeat, so the time
// beyond the minimum is a sum of geometric stays; death is absorbing for the mother
// (a dead mother can only leave, never bud again). Arcs are tagged with the
// event they stand for, so decoded paths read directly as events.
//
// A dead mother passes through `deadFrames()` states of increasing age before
// the last one repeats, so that morphology that changes gradually after death
// can be matched to how long ago death was (its onset is then placed well).
//
// A mother that leaves (washout, or a corpse flushed out) leaves the trap
// "vacated" for at least one frame before another can arrive: a new tenure
// needs an empty frame between, so a flicker of detection cannot start one.
//
// The frame after a separation is its own state ("just separated", with or
// without the next bud already showing), because that is the one frame in
// which the daughter's departure can be seen.
//
// Invariants: state 0 is Empty, 1 Unbudded, 2..m+1 Budded age 1..m,
// m+2..m+1+K Dead age 1..K, m+2+K Vacated, m+3+K just separated, m+4+K just
// separated with a new bud; arcs out of each state sum to one; all rates are per frame, derived
// from per-minute rates and the frame interval, so the model scales with it.
#include <string>

#include "core/propose/sparse_hmm.h"

namespace budledger::propose {

enum class Transition : int {
  Stay = 0,
  Advance,        // budded age k -> k+1
  Arrival,        // empty -> live mother
  Bud,            // unbudded -> budded age 1
  Separation,     // budded -> unbudded
  SeparationBud,  // budded -> budded age 1: daughter leaves and a new bud shows at once
  Death,          // live -> dead
  Washout,        // live -> empty
  DeadGone,       // dead -> empty (no event: the tenure already ended at death)
};
inline constexpr int kTransitionCount = 9;

enum class StateGroup { Empty, Unbudded, BudNew, BudYoung, BudOld, Dead };
inline constexpr int kStateGroupCount = 6;

// Per-minute rates and durations; defaults are common practice for budding
// yeast in traps (division ~90 min early in life, short G1 in mothers).
struct CycleParams {
  double intervalMin = 10;
  double minBuddedMin = 45;            // shortest bud-to-separation time
  double meanUnbuddedMin = 15;         // mean time from separation to next bud (G1)
  double meanBuddedExtraMin = 30;      // mean budded time beyond the minimum
  // That extra time is a sum of this many geometric stays, taken in the last bud ages
  // (at most all but the first two): cell-cycle phases are regular (CV ~0.15-0.2,
  // common practice), and one memoryless stay both overstated long budded stretches
  // and, relative to them, understated ones of the usual length. Two stages (one at
  // frames of 15 min or more, where the chain has three ages) were chosen on the
  // validation sets; three were no better at 10-min frames (docs/validation.md).
  int buddedTailStages = 2;
  double immediateRebud = 0.3;         // share of separations with the next bud in the same frame
  double arrivalPerMin = 1.0 / 2000;   // an empty trap catches a new mother
  double washoutPerMin = 1.0 / 20000;  // a live mother is flushed out
  double deathPerMin = 1.0 / 3000;     // a live mother dies
  double deadGonePerMin = 1.0 / 3000;  // a dead mother is flushed out
  double deathOnsetMin = 180;          // morphological signs of death develop over this time
  double arrivalBudded = 0.5;          // share of arriving mothers that carry a bud
  // Frame-0 state probabilities (the rest is spread over budded ages).
  double initialEmpty = 0.1;
  double initialUnbudded = 0.3;
  double initialDead = 0.01;
};

class CycleModel {
 public:
  explicit CycleModel(const CycleParams& params);

  const CycleParams& params() const { return params_; }
  const SparseHmm& hmm() const { return hmm_; }
  int buddedFrames() const { return m_; }
  int buddedTailStages() const { return tail_; }  // the last ages, each of which may repeat
  // A budded state in those last ages (the just-separated state with a new bud is not).
  bool inBuddedTail(int state) const {
    return state != separatedBudState() && budAge(state) > m_ - tail_;
  }
  int deadFrames() const { return k_; }
  int stateCount() const { return m_ + 5 + k_; }

  static constexpr int emptyState() { return 0; }
  static constexpr int unbuddedState() { return 1; }
  int buddedState(int age) const { return 1 + age; }         // age 1..m
  int deadState(int age = 1) const { return m_ + 1 + age; }  // age 1..K
  int vacatedState() const { return m_ + 2 + k_; }
  int separatedState() const { return m_ + 3 + k_; }     // unbudded, daughter just gone
  int separatedBudState() const { return m_ + 4 + k_; }  // new bud (age 1), daughter just gone
  bool justSeparated(int state) const { return state >= m_ + 3 + k_; }
  int budAge(int state) const;   // 1..m for budded states, else 0
  int deadAge(int state) const;  // 1..K for dead states, else 0
  bool isDead(int state) const { return deadAge(state) > 0; }
  bool stateGroupHasMother(int state) const { return isLive(state) || isDead(state); }
  StateGroup group(int state) const;
  bool isLive(int state) const { return (state >= 1 && state <= m_ + 1) || justSeparated(state); }
  Transition tag(int arc) const { return static_cast<Transition>(hmm_.arcs()[arc].tag); }

 private:
  CycleParams params_;
  int m_;
  int k_;
  int tail_;
  SparseHmm hmm_;
};

std::string toString(Transition t);

}  // namespace budledger::propose
