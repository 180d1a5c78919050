#include "core/propose/proposer.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>
#include <thread>

#include "core/base/median.h"
#include "core/base/parallel_for.h"

namespace budledger::propose {
namespace {

// Which event kinds an arc stands for (a separation with an immediate bud is two).
std::vector<EventKind> eventsOf(Transition t) {
  switch (t) {
    case Transition::Arrival:
      return {EventKind::Arrival};
    case Transition::Bud:
      return {EventKind::Bud};
    case Transition::Separation:
      return {EventKind::Separation};
    case Transition::SeparationBud:
      return {EventKind::Separation, EventKind::Bud};
    case Transition::Death:
      return {EventKind::Death};
    case Transition::Washout:
      return {EventKind::Washout};
    default:
      return {};
  }
}

struct TransitionCounts {
  double unbuddedStay = 0, bud = 0;
  double tailStay = 0, separation = 0, separationBud = 0;
  double emptyStay = 0, arrival = 0;

  void merge(const TransitionCounts& o) {
    unbuddedStay += o.unbuddedStay;
    bud += o.bud;
    tailStay += o.tailStay;
    separation += o.separation;
    separationBud += o.separationBud;
    emptyStay += o.emptyStay;
    arrival += o.arrival;
  }
};

void countTransitions(const CycleModel& model, const SparseHmm::Posteriors& post, int frames,
                      TransitionCounts& c) {
  const auto& arcs = model.hmm().arcs();
  const std::size_t A = arcs.size();
  for (int t = 1; t < frames; ++t) {
    const double* row = &post.arc[static_cast<std::size_t>(t) * A];
    for (std::size_t a = 0; a < A; ++a) {
      const Arc& arc = arcs[a];
      const auto tag = static_cast<Transition>(arc.tag);
      if (arc.from == CycleModel::unbuddedState() || arc.from == model.separatedState()) {
        if (tag == Transition::Stay || tag == Transition::Advance) c.unbuddedStay += row[a];
        if (tag == Transition::Bud) c.bud += row[a];
      } else if (model.inBuddedTail(arc.from)) {
        if (tag == Transition::Stay) c.tailStay += row[a];
        if (tag == Transition::Separation) c.separation += row[a];
        if (tag == Transition::SeparationBud) c.separationBud += row[a];
      } else if (arc.from == CycleModel::emptyState() || arc.from == model.vacatedState()) {
        if (tag == Transition::Stay || tag == Transition::Advance) c.emptyStay += row[a];
        if (tag == Transition::Arrival) c.arrival += row[a];
      }
    }
  }
}

// MAP update of the durations and rates from expected transition counts.
CycleParams reestimate(const CycleParams& prior, const TransitionCounts& c, double weight) {
  CycleParams p = prior;
  const double dt = prior.intervalMin;
  // Geometric sojourns: mean frames = (stays + leaves) / leaves, with the prior's mean as
  // pseudo-observations of `weight` sojourns.
  const double priorUnbuddedFrames = std::max(1.0, prior.meanUnbuddedMin / dt);
  const double unbuddedFrames =
      (c.unbuddedStay + c.bud + weight * priorUnbuddedFrames) / (c.bud + weight);
  p.meanUnbuddedMin = std::max(1.0, unbuddedFrames) * dt;
  // The extra budded time: all stays in the tail ages per budded stretch (one leaves the
  // tail by separating).
  const double priorExtraFrames = std::max(0.0, prior.meanBuddedExtraMin / dt);
  const double leaves = c.separation + c.separationBud;
  const double extraFrames = (c.tailStay + weight * priorExtraFrames) / (leaves + weight);
  p.meanBuddedExtraMin = std::max(0.0, extraFrames) * dt;
  p.immediateRebud =
      std::clamp((c.separationBud + weight * prior.immediateRebud) / (leaves + weight), 0.01, 0.99);
  const double priorArrival = 1 - std::exp(-prior.arrivalPerMin * dt);
  const double arrival = std::clamp(
      (c.arrival + weight * priorArrival) / (c.emptyStay + c.arrival + weight), 1e-5, 0.5);
  p.arrivalPerMin = -std::log(1 - arrival) / dt;
  return p;
}

int argmax4(const std::array<double, 4>& q) {
  return static_cast<int>(std::max_element(q.begin(), q.end()) - q.begin());
}

// How far a bud may move from where the decoded path put it (frames).
constexpr int kBudReach = 2;

// Expected events of one kind (tempered posterior, per frame they enter) within a frame
// of frame u: an event's confidence, and what the cycle-count rules weigh. Nothing
// enters frame 0.
double expectedAround(const std::vector<double>& expected, int u) {
  double e = 0;
  for (int v = std::max(1, u - 1); v <= std::min(static_cast<int>(expected.size()) - 1, u + 1); ++v)
    e += expected[static_cast<std::size_t>(v)];
  return e;
}

// The frame of the last event before events[i] that is not a bud (0 if none): a bud
// moved earlier may not pass it.
int frameOfEventBefore(const std::vector<Event>& events, std::size_t i) {
  for (std::size_t j = i; j-- > 0;)
    if (events[j].kind != EventKind::Bud) return events[j].frame;
  return 0;
}

// The path is the likeliest sequence as a whole; the frame a bud is likeliest to have
// emerged at, given all the evidence, is the mode of its own posterior, and the two
// differ where a bud's first, smallest frames are read uncertainly (the path waited
// for the bud ratio to be unambiguous: buds two frames late were the largest single
// source of review edits). Each bud moves to the frame of highest posterior bud
// probability within kBudReach of its call, never past the events on either side of it
// (a separation in the same frame may stay); its confidence follows it.
void placeBudsAtPosteriorMode(const std::vector<double>& budPosterior, std::vector<Event>& events) {
  const int T = static_cast<int>(budPosterior.size());
  for (std::size_t i = 0; i < events.size(); ++i) {
    Event& ev = events[i];
    if (ev.kind != EventKind::Bud) continue;
    // A separation in the same frame as the bud may stay there.
    const int lo = std::max({1, ev.frame - kBudReach, frameOfEventBefore(events, i)});
    int hi = std::min(T - 1, ev.frame + kBudReach);
    for (std::size_t j = i + 1; j < events.size(); ++j)
      if (events[j].kind != EventKind::Bud) {
        hi = std::min(hi, events[j].frame - 1);
        break;
      }
    int best = ev.frame;
    for (int u = lo; u <= hi; ++u)
      if (budPosterior[static_cast<std::size_t>(u)] >
          budPosterior[static_cast<std::size_t>(best)] + 1e-9)
        best = u;
    if (best == ev.frame) continue;
    ev.frame = best;
    ev.confidence = std::clamp(expectedAround(budPosterior, best), 0.0, 1.0);
  }
}

// A bud's first readings are small, and the bud ratio of an unbudded mother is narrow
// at 0 (most of her readings are exactly 0: no bud found), so a first reading of a few
// percent of her area counts as "unbudded" in the model and the bud is called a frame
// or two after it was first read (a third of buds a frame late on fresh seeds; two
// frames late was the largest source of review edits). A bud found in the frames just
// before the call is that bud: each bud moves back over the frames, up to kBudReach,
// that read a bud of any size, never before the event before it. Counts do not change.
// Its confidence stays: the posterior, which holds the same view of small readings, is
// lower at the earlier frame though the calls there are right more often (letting it
// follow the bud doubled the calibration error on fresh seeds). (Reading a 0 as its own
// outcome in the model itself placed buds as well but took the same small readings
// from separations: RLS exact -1.6 points on fresh seeds, docs/validation.md.)
void extendBudsBackOverReadBuds(const TrapEvidence& evidence, std::vector<Event>& events) {
  for (std::size_t i = 0; i < events.size(); ++i) {
    Event& ev = events[i];
    if (ev.kind != EventKind::Bud) continue;
    const int lo = std::max(frameOfEventBefore(events, i) + 1, ev.frame - kBudReach);
    int f = ev.frame;
    while (f - 1 >= lo) {
      const FrameEvidence& e = evidence[static_cast<std::size_t>(f - 1)];
      if (!e.informative || !(e.budRatio > 0)) break;
      --f;
    }
    ev.frame = f;
  }
}

// Forbids the states `forbidden(s)` says over frames [from, to) of a [frames x states]
// log-likelihood table, so that a re-decoded path cannot use them there.
template <typename Pred>
void forbidStates(const CycleModel& model, std::vector<double>& emission, int from, int to,
                  Pred forbidden) {
  const auto S = static_cast<std::size_t>(model.stateCount());
  for (int t = from; t < to; ++t)
    for (int s = 0; s < model.stateCount(); ++s)
      if (forbidden(s))
        emission[static_cast<std::size_t>(t) * S + static_cast<std::size_t>(s)] =
            -std::numeric_limits<double>::infinity();
}

// Decodes again with the states `forbidden(s)` forbidden over frames [from, to) and
// keeps the new path if `accept(newPath)`; else the old path and emission table stay.
template <typename Pred, typename Accept>
void redecodeIf(const CycleModel& model, std::vector<double>& emission, int T,
                std::vector<int>& path, int from, int to, Pred forbidden, Accept accept) {
  const auto S = static_cast<std::size_t>(model.stateCount());
  const auto first =
      emission.begin() + static_cast<std::ptrdiff_t>(static_cast<std::size_t>(from) * S);
  const auto last =
      emission.begin() + static_cast<std::ptrdiff_t>(static_cast<std::size_t>(to) * S);
  const std::vector<double> kept(first, last);
  forbidStates(model, emission, from, to, forbidden);
  std::vector<int> again = model.hmm().viterbi(emission, T);
  if (accept(again)) {
    path = std::move(again);
    return;
  }
  std::copy(kept.begin(), kept.end(), first);
}

// What a state says the trap holds: a live mother (0), a dead one (1) or nobody (2).
int tenureKind(const CycleModel& model, int state) {
  return model.isLive(state) ? 0 : model.isDead(state) ? 1 : 2;
}

// Frames that show nothing (defocus, a failed registration) cannot show a mother leave,
// die or arrive. Through a long run of them the path still took her away and brought a
// "newcomer" back (a 40-frame gap split a steady mother's record at a washout and an
// arrival): with no evidence the likeliest single path is the one through states that
// stay put longest, an empty or dead trap, not a living mother's cycles. Where the path
// changes between a live mother, a dead one and an empty trap inside such a run, that
// run keeps what the trap held before it and the trap is decoded again; a change that
// is real then shows at the first frame with evidence. Only runs of kLongGapMin or
// more: in a short one the path's choice is as good as any, and holding it there moved
// true deaths and washouts on simulated sweeps (RLS MAE +0.01..+0.03 when every gap was
// held).
constexpr double kLongGapMin = 120;

void holdTenuresThroughGaps(const CycleModel& model, const TrapEvidence& evidence,
                            std::vector<double>& emission, int T, std::vector<int>& path) {
  const int longGap =
      std::max(2, static_cast<int>(std::lround(kLongGapMin / model.params().intervalMin)));
  auto holds = [&](int s) { return tenureKind(model, s); };
  constexpr int kMaxRounds = 4;
  for (int round = 0; round < kMaxRounds; ++round) {
    bool changed = false;
    for (int t = 1; t < T;) {
      if (evidence[static_cast<std::size_t>(t)].informative) {
        ++t;
        continue;
      }
      int end = t;
      while (end < T && !evidence[static_cast<std::size_t>(end)].informative) ++end;
      const int before = holds(path[static_cast<std::size_t>(t - 1)]);
      bool moves = false;
      for (int u = t; u < end; ++u)
        moves = moves || holds(path[static_cast<std::size_t>(u)]) != before;
      if (moves && end - t >= longGap) {
        forbidStates(model, emission, t, end, [&](int s) { return holds(s) != before; });
        changed = true;
      }
      t = end;
    }
    if (!changed) return;
    path = model.hmm().viterbi(emission, T);
  }
}

// A death the decoded path calls but the calibrated posterior does not back: less than
// this expected number of deaths within kDeathSupportMin of it, and the mother not yet
// likely dead in that time after it (a true death called late is dead already by the
// posterior). Such calls were nearly all false on the validation sets (all 19 with
// under 0.1 within two hours; 1 of the 23 under 0.3 was true), and each split a living
// mother's record in two (docs/validation.md).
constexpr double kDeathSupport = 0.2;
constexpr double kDeathSupportMin = 120;

// Re-decodes without the dead states over the stretch of each unsupported death until
// none is left. The Viterbi path uses the full likelihood, which overstates the
// evidence (see ProposeOptions::confidenceTemper), and a rare, absorbing state is where
// that shows most: a few frames of a mother hidden by a crowd or read oddly can outweigh
// the prior against dying, never against the tempered posterior.
// `deaths`: expected deaths entering each frame, `pDead`: P(dead) per frame, both from
// the tempered posterior.
void rejectUnsupportedDeaths(const CycleModel& model, const std::vector<double>& deaths,
                             const std::vector<float>& pDead, std::vector<double>& emission, int T,
                             std::vector<int>& path) {
  const int reach =
      std::max(1, static_cast<int>(std::lround(kDeathSupportMin / model.params().intervalMin)));
  constexpr int kMaxRounds = 4;
  for (int round = 0; round < kMaxRounds; ++round) {
    int from = -1;
    for (int t = 1; t < T && from < 0; ++t) {
      const auto ut = static_cast<std::size_t>(t);
      if (!model.isDead(path[ut]) || model.isDead(path[ut - 1])) continue;
      double support = 0;
      for (int u = std::max(1, t - reach); u <= std::min(T - 1, t + reach); ++u)
        support += deaths[static_cast<std::size_t>(u)];
      double deadAfter = 0;  // a late call of a true death: dead already, per the posterior
      for (int u = t; u <= std::min(T - 1, t + reach); ++u)
        deadAfter = std::max(deadAfter, static_cast<double>(pDead[static_cast<std::size_t>(u)]));
      if (support < kDeathSupport && deadAfter < 0.5) from = t;
    }
    if (from < 0) return;
    int to = from;
    while (to < T && model.isDead(path[static_cast<std::size_t>(to)])) ++to;
    forbidStates(model, emission, from, to, [&](int s) { return model.isDead(s); });
    path = model.hmm().viterbi(emission, T);
  }
}

// The most empty frames between a corpse leaving and a "newcomer" arriving for the two
// to be taken for one corpse missed by the outline, unless the posterior has the trap
// dead at the arrival anyway (see mergeCorpseFlickers).
constexpr int kFlickerGap = 2;

// A corpse the outline misses for a frame or two reads as the mother leaving and a new
// one arriving; the newcomer never buds and soon "dies" (a corpse whose look recovered
// part of its change fits a fresh death's young ages better than the oldest one), and
// the same repeats every few hours: a string of short false records after one true
// death (78 such arrival-death pairs in a sweep of 30 fresh seeds, docs/validation.md).
// Where the path leaves the dead states and, after at most kFlickerGap empty frames (or
// more while the tempered posterior `pDead` still has the trap dead), holds a live
// mother who dies without a bud or a separation, the whole stretch is one corpse: every
// state but the dead ones is forbidden over it and the trap decoded again.
void mergeCorpseFlickers(const CycleModel& model, const std::vector<float>& pDead,
                         std::vector<double>& emission, int T, std::vector<int>& path) {
  auto state = [&](int t) { return path[static_cast<std::size_t>(t)]; };
  constexpr int kMaxRounds = 8;
  for (int round = 0; round < kMaxRounds; ++round) {
    bool changed = false;
    for (int t = 1; t < T; ++t) {
      if (!model.isDead(state(t - 1)) || model.isDead(state(t))) continue;
      int arrival = t;  // first frame after the empty ones
      while (arrival < T && model.group(state(arrival)) == StateGroup::Empty) ++arrival;
      if (arrival >= T || !model.isLive(state(arrival))) continue;
      if (arrival - t > kFlickerGap && pDead[static_cast<std::size_t>(arrival)] < 0.5) continue;
      int end = arrival;  // first frame after the live stretch
      bool divided = false;
      for (; end < T && model.isLive(state(end)); ++end)
        divided = divided || (end > arrival &&
                              (model.budAge(state(end)) == 1 || model.justSeparated(state(end))));
      if (divided || end >= T || !model.isDead(state(end))) continue;
      forbidStates(model, emission, t, end, [&](int s) { return !model.isDead(s); });
      changed = true;
      t = end;
    }
    if (!changed) return;
    path = model.hmm().viterbi(emission, T);
  }
}

// Frames entering a just-separated state in a decoded path, in runs of one living mother.
std::vector<std::vector<int>> separationRuns(const CycleModel& model,
                                             const std::vector<int>& path) {
  std::vector<std::vector<int>> runs(1);
  for (std::size_t t = 1; t < path.size(); ++t) {
    if (!model.isLive(path[t])) {
      if (!runs.back().empty()) runs.emplace_back();
    } else if (model.justSeparated(path[t])) {
      runs.back().push_back(static_cast<int>(t));
    }
  }
  return runs;
}

std::size_t separationCount(const CycleModel& model, const std::vector<int>& path) {
  std::size_t n = 0;
  for (const auto& run : separationRuns(model, path)) n += run.size();
  return n;
}

// The mother's usual cycle near intervals [skipFrom, skipTo] of her separation frames
// `seps` (interval i runs from seps[i] to seps[i + 1]): the median of up to three
// intervals on either side, those skipped left out; 0 with fewer than two to go by.
int localCycle(const std::vector<int>& seps, std::size_t skipFrom, std::size_t skipTo) {
  constexpr std::size_t kNeighbours = 3;
  std::vector<int> around;
  const std::size_t first = skipFrom >= kNeighbours ? skipFrom - kNeighbours : 0;
  for (std::size_t j = first; j + 1 < seps.size() && j <= skipTo + kNeighbours; ++j)
    if (j < skipFrom || j > skipTo) around.push_back(seps[j + 1] - seps[j]);
  if (around.size() < 2) return 0;
  return upperMedian(std::move(around));
}

// Whether two paths hold a live mother, a dead one or an empty trap in the same frames.
bool sameTenures(const CycleModel& model, const std::vector<int>& a, const std::vector<int>& b) {
  for (std::size_t t = 0; t < a.size(); ++t)
    if (tenureKind(model, a[t]) != tenureKind(model, b[t])) return false;
  return true;
}

// Decodes again with the states `forbidden(s)` forbidden over frames [from, to) and
// keeps the new path if it holds `change` separations more than the old one and the
// same tenures; else the old path and emission table stay. (Without a separation to
// reset her cycle the path could end the mother's tenure instead, with a death and an
// arrival: a count put right at the cost of a split record.)
template <typename Pred>
void redecodeIfCountChanges(const CycleModel& model, std::vector<double>& emission, int T,
                            std::vector<int>& path, int from, int to, Pred forbidden, int change) {
  const auto before = static_cast<long>(separationCount(model, path));
  redecodeIf(model, emission, T, path, from, to, forbidden, [&](const std::vector<int>& again) {
    return static_cast<long>(separationCount(model, again)) - before == change &&
           sameTenures(model, path, again);
  });
}

// A mother the path calls dead, followed within kReturnMin by a "newcomer" at least as
// large as she was, is the same mother: replicative ageing enlarges a mother and
// mothers die old, while the cells the flow carries into an emptied trap are mostly
// young daughters from upstream (common practice). A mother read oddly for a while (a
// crowd, a lingering daughter cutting her outline, contrast drifting with focus) looked
// dead to the path, which then had her "re-arrive" once her cycles showed again. On two
// simulated sweeps (seeds 9801-9830, 9901-9930) the engine called 92 death-arrival pairs
// where the truth had neither; in 76 of them the newcomer's median area over her first
// frames was at least her predecessor's over her last, against 2 of the 20 true pairs
// (docs/validation.md). Such a pair is decoded again with the trap forbidden to stand
// empty from the death to the end of the newcomer's stretch: one mother living
// throughout, or a corpse staying through it. The new path is kept only if the trap's
// separation count does not fall (on one sweep seed the re-decoded trap kept a corpse
// through 13 of a living mother's cycles).
constexpr double kReturnMin = 360;
constexpr int kSizeFrames = 8;

// The median of the mother's log area over up to kSizeFrames informative frames from
// `from` on, stepping by `step`, while the path holds a live mother; NaN if fewer than
// three were read.
double liveLogArea(const CycleModel& model, const TrapEvidence& evidence,
                   const std::vector<int>& path, int from, int step) {
  std::vector<double> v;
  const int T = static_cast<int>(path.size());
  for (int t = from; t >= 0 && t < T && model.isLive(path[static_cast<std::size_t>(t)]) &&
                     static_cast<int>(v.size()) < kSizeFrames;
       t += step) {
    const FrameEvidence& e = evidence[static_cast<std::size_t>(t)];
    if (e.informative && isKnown(e.morph[kMorphLogArea])) v.push_back(e.morph[kMorphLogArea]);
  }
  if (v.size() < 3) return kMissing;
  return upperMedian(std::move(v));
}

void rejoinReturningMothers(const CycleModel& model, const TrapEvidence& evidence,
                            std::vector<double>& emission, int T, std::vector<int>& path) {
  const int reach =
      std::max(1, static_cast<int>(std::lround(kReturnMin / model.params().intervalMin)));
  auto state = [&](int t) { return path[static_cast<std::size_t>(t)]; };
  int from = 1;  // pairs that die before this frame were tried
  constexpr int kMaxPairs = 8;
  for (int pair = 0; pair < kMaxPairs; ++pair) {
    int death = -1, end = -1;
    for (int t = from; t < T && death < 0; ++t) {
      if (!model.isLive(state(t - 1)) || !model.isDead(state(t))) continue;
      int arrival = t;
      while (arrival < T && !model.isLive(state(arrival))) ++arrival;
      if (arrival >= T || arrival - t > reach) continue;
      const double before = liveLogArea(model, evidence, path, t - 1, -1);
      const double after = liveLogArea(model, evidence, path, arrival, +1);
      if (!isKnown(before) || !isKnown(after) || after < before) continue;
      death = t;
      for (end = arrival; end < T && model.isLive(state(end));) ++end;
    }
    if (death < 0) return;
    from = death + 1;
    redecodeIf(
        model, emission, T, path, death, end,
        [&](int s) { return model.group(s) == StateGroup::Empty; },
        [&](const std::vector<int>& again) {
          return separationCount(model, again) >= separationCount(model, path);
        });
  }
}

// How many rounds of forcing or forbidding a separation a trap gets.
constexpr int kCountRounds = 8;

// A daughter who separates but stays pressed against the mother reads as a full-grown
// bud until the next bud shows, and a crowd can hide a bud's growth: the path, reading
// the full likelihood, then makes one long cycle of two, the commonest miscount on
// fresh seeds (most wrong counts were one short). The tempered posterior keeps both
// readings open and expects a separation inside such a stretch (of the stretches 1.5
// times as long as the cycles around them with 0.3 or more expected within three
// frames, 60 of 72 held a true separation on 10 fresh seeds, docs/validation.md).
// Where the path's interval between two separations is kLongCycle times the mother's
// usual cycle near it, and the posterior expects kHiddenSeparation or more within
// three frames around a frame of it that leaves room for a whole budded phase on both
// sides, the path is made to separate at the likeliest such frame and decoded again.
// The budded phase before it must have been in view: a gap in the evidence (defocus)
// is room for any number of cycles the prior likes. The new path must hold one
// separation more: where it only moved one (the posterior hedging over when a
// separation next to such a gap happened), the old path stays.
void splitLongCycles(const CycleModel& model, const TrapEvidence& evidence,
                     const std::vector<double>& separations, std::vector<double>& emission, int T,
                     std::vector<int>& path) {
  constexpr double kLongCycle = 1.5;
  constexpr double kHiddenSeparation = 0.3;
  const int minBudded = model.buddedFrames();
  auto inView = [&](int from, int to) {
    for (int t = std::max(0, from); t <= std::min(T - 1, to); ++t)
      if (!evidence[static_cast<std::size_t>(t)].informative) return false;
    return true;
  };
  std::vector<bool> tried(static_cast<std::size_t>(T), false);
  // The frame to force a separation at between separations a and b, or -1.
  auto hiddenSeparation = [&](int a, int b) {
    int force = -1;
    double best = kHiddenSeparation;
    for (int u = a + minBudded + 1; u + minBudded + 1 <= b; ++u) {
      if (tried[static_cast<std::size_t>(u)] || !inView(u - minBudded - 1, u + 1)) continue;
      if (const double e = expectedAround(separations, u); e >= best) {
        best = e;
        force = u;
      }
    }
    return force;
  };
  for (int round = 0; round < kCountRounds; ++round) {
    int force = -1;
    for (const auto& seps : separationRuns(model, path)) {
      for (std::size_t i = 0; i + 1 < seps.size() && force < 0; ++i) {
        const int usual = localCycle(seps, i, i);
        if (usual > 0 && seps[i + 1] - seps[i] >= kLongCycle * usual)
          force = hiddenSeparation(seps[i], seps[i + 1]);
      }
      if (force >= 0) break;
    }
    if (force < 0) return;
    tried[static_cast<std::size_t>(force)] = true;
    redecodeIfCountChanges(
        model, emission, T, path, force, force + 1, [&](int s) { return !model.justSeparated(s); },
        +1);
  }
}

// The other way round: a frame the outline reads oddly (a bud cut in two, a neighbour
// passing) can make the full-likelihood path separate in the middle of a cycle, and two
// short cycles stand for one. Where a separation leaves a cycle on either side of it
// shorter than kShortCycle times the mother's usual cycle near them, and the tempered
// posterior expects fewer than kUnbackedSeparation separations within three frames of
// it, the separation states are forbidden there and the trap decoded again; the new
// path must hold one separation fewer (not the same one moved).
void mergeShortCycles(const CycleModel& model, const std::vector<double>& separations,
                      std::vector<double>& emission, int T, std::vector<int>& path) {
  constexpr double kShortCycle = 0.6;
  constexpr double kUnbackedSeparation = 0.3;
  std::vector<bool> tried(static_cast<std::size_t>(T), false);
  for (int round = 0; round < kCountRounds; ++round) {
    int drop = -1;
    for (const auto& seps : separationRuns(model, path)) {
      for (std::size_t i = 1; i + 1 < seps.size() && drop < 0; ++i) {
        const int f = seps[i];
        if (tried[static_cast<std::size_t>(f)] ||
            expectedAround(separations, f) >= kUnbackedSeparation)
          continue;
        const int usual = localCycle(seps, i - 1, i);
        const int shorter = std::min(f - seps[i - 1], seps[i + 1] - f);
        if (usual > 0 && shorter < kShortCycle * usual) drop = f;
      }
      if (drop >= 0) break;
    }
    if (drop < 0) return;
    tried[static_cast<std::size_t>(drop)] = true;
    redecodeIfCountChanges(
        model, emission, T, path, std::max(0, drop - 1), std::min(T, drop + 2),
        [&](int s) { return model.justSeparated(s); }, -1);
  }
}

}  // namespace

TrapCalls decodeTrap(int position, int trap, const CycleModel& model,
                     const EmissionParams& emission, const TrapEvidence& evidence,
                     const ReviewRules& review, const MorphBaseline* baseline,
                     double confidenceTemper) {
  TrapCalls out;
  out.trap = trap;
  const int T = static_cast<int>(evidence.size());
  if (T == 0) return out;
  const int S = model.stateCount();
  auto em = emissionLogLikelihood(model, emission, evidence, baseline);
  const SparseHmm& hmm = model.hmm();
  out.path = hmm.viterbi(em, T);
  // The posteriors read the tempered likelihood.
  std::vector<double> tempered = em;
  for (double& v : tempered) v *= confidenceTemper;
  const auto post = hmm.forwardBackward(tempered, T);

  out.pLive.resize(static_cast<std::size_t>(T));
  out.pBudded.resize(static_cast<std::size_t>(T));
  out.pDead.resize(static_cast<std::size_t>(T));
  for (int t = 0; t < T; ++t) {
    double live = 0, budded = 0;
    for (int s = 0; s < S; ++s) {
      const double g = post.state[static_cast<std::size_t>(t * S + s)];
      if (model.isLive(s)) live += g;
      if (model.budAge(s) > 0) budded += g;
    }
    out.pLive[static_cast<std::size_t>(t)] = static_cast<float>(live);
    out.pBudded[static_cast<std::size_t>(t)] = static_cast<float>(budded);
    double dead = 0;
    for (int k = 1; k <= model.deadFrames(); ++k)
      dead += post.state[static_cast<std::size_t>(t * S + model.deadState(k))];
    out.pDead[static_cast<std::size_t>(t)] = static_cast<float>(dead);
  }

  // Review flags from what the classifier saw in informative frames.
  int informative = 0, crowded = 0, empty = 0;
  for (const auto& f : evidence) {
    if (!f.informative) continue;
    ++informative;
    const int c = argmax4(f.occupancy);
    crowded += c == kCrowded;
    empty += c == kEmpty;
  }
  if (informative < review.informativeShare * T) out.flags.push_back(kFlagUninformative);
  if (informative > 0 && crowded >= review.crowdedShare * informative) {
    out.flags.push_back(kFlagCrowded);
    return out;  // no events: nothing in this trap can be told apart
  }
  if (informative > 0 && empty >= review.emptyShare * informative) out.flags.push_back(kFlagEmpty);

  // Arc between two consecutive Viterbi states (unique per state pair in CycleModel).
  std::map<std::pair<int, int>, int> arcOf;
  const auto& arcs = hmm.arcs();
  for (std::size_t a = 0; a < arcs.size(); ++a)
    arcOf.emplace(std::make_pair(arcs[a].from, arcs[a].to), static_cast<int>(a));
  // Expected number of events of each kind entering frame t.
  const std::size_t A = arcs.size();
  std::array<std::vector<double>, 5> expected;
  for (auto& v : expected) v.assign(static_cast<std::size_t>(T), 0.0);
  for (int t = 1; t < T; ++t)
    for (std::size_t a = 0; a < A; ++a) {
      const double p = post.arc[static_cast<std::size_t>(t) * A + a];
      if (p <= 0) continue;
      for (EventKind k : eventsOf(static_cast<Transition>(arcs[a].tag)))
        expected[static_cast<std::size_t>(k)][static_cast<std::size_t>(t)] += p;
    }
  holdTenuresThroughGaps(model, evidence, em, T, out.path);
  rejectUnsupportedDeaths(model, expected[static_cast<std::size_t>(EventKind::Death)], out.pDead,
                          em, T, out.path);
  mergeCorpseFlickers(model, out.pDead, em, T, out.path);
  rejoinReturningMothers(model, evidence, em, T, out.path);
  splitLongCycles(model, evidence, expected[static_cast<std::size_t>(EventKind::Separation)], em, T,
                  out.path);
  mergeShortCycles(model, expected[static_cast<std::size_t>(EventKind::Separation)], em, T,
                   out.path);
  for (int t = 1; t < T; ++t) {
    const int from = out.path[static_cast<std::size_t>(t - 1)];
    const int to = out.path[static_cast<std::size_t>(t)];
    if (from == to && from != model.buddedState(model.buddedFrames())) continue;
    const auto it = arcOf.find({from, to});
    if (it == arcOf.end()) continue;
    for (EventKind k : eventsOf(static_cast<Transition>(arcs[it->second].tag))) {
      const double conf = expectedAround(expected[static_cast<std::size_t>(k)], t);
      Event ev;
      ev.position = position;
      ev.trap = trap;
      ev.frame = t;
      ev.kind = k;
      ev.confidence = std::clamp(conf, 0.0, 1.0);
      out.events.push_back(ev);
    }
  }
  placeBudsAtPosteriorMode(expected[static_cast<std::size_t>(EventKind::Bud)], out.events);
  extendBudsBackOverReadBuds(evidence, out.events);
  return out;
}

PositionCalls proposePosition(int position, const std::vector<int>& trapIds,
                              const std::vector<TrapEvidence>& evidence,
                              const ProposeOptions& options, const Progress& progress) {
  if (trapIds.size() != evidence.size())
    throw std::invalid_argument("proposePosition: one evidence track per trap");
  PositionCalls out;
  CycleParams cycle = options.cycle;
  CycleModel model(cycle);
  EmissionParams emission = EmissionParams::defaults(model.buddedFrames(), model.deadFrames());
  const std::size_t n = evidence.size();
  const int iterations = std::max(0, options.emIterations);
  int workers =
      options.threads > 0 ? options.threads : static_cast<int>(std::thread::hardware_concurrency());
  workers = std::max(1, workers);

  // Start: a mother is wherever the classifier sees anything; her live baseline and the
  // spread of her morphology around it come from those frames.
  std::vector<std::vector<float>> pLive(n);
  for (std::size_t i = 0; i < n; ++i)
    for (const auto& f : evidence[i])
      pLive[i].push_back(f.informative ? static_cast<float>(1 - f.occupancy[kEmpty]) : 0.f);
  std::vector<MorphBaseline> baselines(n);
  auto updateBaselines = [&] {
    const auto ref = liveReference(evidence, pLive);
    for (std::size_t i = 0; i < n; ++i)
      baselines[i].assign(ref.begin(), ref.begin() + static_cast<std::ptrdiff_t>(
                                                         std::min(ref.size(), evidence[i].size())));
  };
  updateBaselines();
  for (int j = 0; j < kMorphCount; ++j) {
    std::vector<double> dev;
    for (std::size_t i = 0; i < n; ++i)
      for (std::size_t t = 0; t < evidence[i].size(); ++t) {
        const double v = evidence[i][t].morph[static_cast<std::size_t>(j)];
        const double b = baselines[i][t][static_cast<std::size_t>(j)];
        if (pLive[i][t] > 0.5 && isKnown(v) && isKnown(b)) dev.push_back(std::abs(v - b));
      }
    if (dev.size() > 10) {
      std::nth_element(dev.begin(), dev.begin() + static_cast<std::ptrdiff_t>(dev.size() / 2),
                       dev.end());
      const double sd = std::max(1e-6, 1.4826 * dev[dev.size() / 2]);
      emission.morphLiveSigma[static_cast<std::size_t>(j)] = sd;
      emission.morphDeadSigma[static_cast<std::size_t>(j)] = sd;
    }
  }
  initialiseDeadMorphology(emission, evidence, baselines);
  EmissionParams emissionPrior = emission;

  // Baum-Welch rounds; the last `localRounds` compare each mother with her own local
  // live baseline (fixed from the position-wide rounds' posteriors) to time death well.
  const int localRounds = std::min(iterations, std::max(0, options.localBaselineRounds));
  for (int it = 0; it < iterations; ++it) {
    progress("temporal model", static_cast<double>(it) / (iterations + 1));
    if (it == iterations - localRounds && localRounds > 0) {
      const double window = options.localWindowMin / std::max(1e-9, cycle.intervalMin);
      parallelFor(n, workers, [&](std::size_t i, int) {
        baselines[i] = localBaseline(evidence[i], pLive[i], window);
      });
      emissionPrior = emission;
      initialiseDeadMorphology(emission, evidence, baselines);
    }
    const bool positionWide = it < iterations - localRounds;
    // Statistics per trap, merged in trap order, so the result does not depend on how
    // the traps were shared among threads.
    std::vector<EmissionStatistics> stats(
        n, EmissionStatistics(model.buddedFrames(), model.deadFrames()));
    std::vector<TransitionCounts> counts(n);
    std::vector<double> logL(n, 0.0);
    parallelFor(n, workers, [&](std::size_t i, int) {
      const auto& ev = evidence[i];
      const int T = static_cast<int>(ev.size());
      if (T == 0) return;
      const auto em = emissionLogLikelihood(model, emission, ev, &baselines[i]);
      const auto post = model.hmm().forwardBackward(em, T);
      if (!std::isfinite(post.logLikelihood)) return;
      stats[i].add(model, emission, ev, post.state, &baselines[i]);
      countTransitions(model, post, T, counts[i]);
      logL[i] = post.logLikelihood;
      if (!positionWide) return;
      const int S = model.stateCount();
      for (int t = 0; t < T; ++t) {
        double live = 0;
        for (int s = 0; s < S; ++s)
          if (model.isLive(s)) live += post.state[static_cast<std::size_t>(t * S + s)];
        pLive[i][static_cast<std::size_t>(t)] = static_cast<float>(live);
      }
    });
    for (std::size_t i = 1; i < n; ++i) {
      stats[0].merge(stats[i]);
      counts[0].merge(counts[i]);
    }
    if (n == 0) break;
    emission = stats[0].estimate(emissionPrior, options.emissionPriorWeight);
    cycle = reestimate(options.cycle, counts[0], options.transitionPriorWeight);
    model = CycleModel(cycle);
    if (positionWide) updateBaselines();
    out.logLikelihood = 0;
    for (double l : logL) out.logLikelihood += l;
  }

  progress("temporal model", static_cast<double>(iterations) / (iterations + 1));
  out.traps.resize(n);
  parallelFor(n, workers, [&](std::size_t i, int) {
    out.traps[i] = decodeTrap(position, trapIds[i], model, emission, evidence[i], options.review,
                              &baselines[i], options.confidenceTemper);
  });
  out.cycle = cycle;
  out.emission = emission;
  out.buddedFrames = model.buddedFrames();
  progress("temporal model", 1.0);
  return out;
}

}  // namespace budledger::propose
