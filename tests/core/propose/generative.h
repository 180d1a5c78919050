#pragma once
// Samples trap histories from the temporal model's own generative story: a
// state path drawn from CycleModel's transitions and evidence drawn from
// EmissionParams (classifier outputs that are right most of the time, bud
// ratios around the state's mean, departures after separations, a dead-look
// score). Decoding such data
// checks the decoder and the EM, not the image analysis.
#include <cmath>
#include <cstdint>
#include <random>
#include <vector>

#include "core/base/events.h"
#include "core/propose/cycle_model.h"
#include "core/propose/emission.h"

namespace budledger::propose::testing {

// Deterministic across standard libraries (std distributions are not).
class Rng {
 public:
  explicit Rng(std::uint64_t seed) : gen_(seed) {}
  double uniform() { return static_cast<double>(gen_() >> 11) * 0x1.0p-53; }
  double normal() {
    const double u = std::max(uniform(), 1e-300), v = uniform();
    return std::sqrt(-2 * std::log(u)) * std::cos(2 * 3.14159265358979323846 * v);
  }
  template <typename Weights>
  int pick(const Weights& w) {
    double total = 0;
    for (double x : w) total += x;
    double r = uniform() * total;
    int i = 0;
    for (double x : w) {
      if (r < x) return i;
      r -= x;
      ++i;
    }
    return i - 1;
  }

 private:
  std::mt19937_64 gen_;
};

struct SampleOptions {
  double classifierAccuracy = 0.93;
  double uninformative = 0.03;
};

struct Sampled {
  TrapEvidence evidence;
  std::vector<int> states;
  std::vector<Event> events;  // true events (frame = first frame of the new state)
};

inline Sampled sampleTrap(const CycleModel& model, const EmissionParams& ep, int frames, Rng& rng,
                          const SampleOptions& opt = {}) {
  Sampled out;
  const auto& hmm = model.hmm();
  std::vector<double> init;
  for (double l : hmm.logInitial()) init.push_back(std::isfinite(l) ? std::exp(l) : 0.0);
  int s = rng.pick(init);
  for (int t = 0; t < frames; ++t) {
    if (t > 0) {
      std::vector<double> w;
      std::vector<int> arcIdx;
      for (std::size_t a = 0; a < hmm.arcs().size(); ++a)
        if (hmm.arcs()[a].from == s) {
          w.push_back(std::exp(hmm.arcs()[a].logp));
          arcIdx.push_back(static_cast<int>(a));
        }
      const Arc& arc =
          hmm.arcs()[static_cast<std::size_t>(arcIdx[static_cast<std::size_t>(rng.pick(w))])];
      s = arc.to;
      auto push = [&](EventKind k) {
        Event e;
        e.frame = t;
        e.kind = k;
        out.events.push_back(e);
      };
      switch (static_cast<Transition>(arc.tag)) {
        case Transition::Arrival:
          push(EventKind::Arrival);
          break;
        case Transition::Bud:
          push(EventKind::Bud);
          break;
        case Transition::Separation:
          push(EventKind::Separation);
          break;
        case Transition::SeparationBud:
          push(EventKind::Separation);
          push(EventKind::Bud);
          break;
        case Transition::Death:
          push(EventKind::Death);
          break;
        case Transition::Washout:
          push(EventKind::Washout);
          break;
        default:
          break;
      }
    }
    out.states.push_back(s);
    FrameEvidence f;
    if (rng.uniform() < opt.uninformative) {
      f.informative = false;
      out.evidence.push_back(f);
      continue;
    }
    const int g = static_cast<int>(model.group(s));
    const int trueClass = rng.pick(ep.occupancy[static_cast<std::size_t>(g)]);
    const int shown = rng.uniform() < opt.classifierAccuracy
                          ? trueClass
                          : static_cast<int>(rng.uniform() * 4) % 4;
    const double peak = 0.55 + 0.44 * rng.uniform();
    for (int c = 0; c < 4; ++c) f.occupancy[static_cast<std::size_t>(c)] = (1 - peak) / 3;
    f.occupancy[static_cast<std::size_t>(shown)] = peak;
    // Bud ratio and departure wherever there is a mother, as the emission model tells it.
    if (model.stateGroupHasMother(s)) {
      const int age = model.budAge(s);
      double mean = ep.budRatioUnbuddedMean, sigma = ep.budRatioUnbuddedSigma;
      if (age > 0) {
        mean = ep.budRatioMean[static_cast<std::size_t>(age - 1)];
        sigma = ep.budRatioSigma;
      } else if (model.isDead(s)) {
        mean = ep.budRatioDeadMean;
        sigma = ep.budRatioDeadSigma;
      }
      f.budRatio = std::max(0.0, mean + sigma * rng.normal());
      const bool sep = model.justSeparated(s);
      f.departure =
          std::max(0.0, (sep ? ep.departSeparatedMean : ep.departOtherMean) +
                            (sep ? ep.departSeparatedSigma : ep.departOtherSigma) * rng.normal());
    }
    const bool deadLook = rng.uniform() < ep.deadLook[static_cast<std::size_t>(g)];
    f.deadLook = deadLook ? 0.6 + 0.39 * rng.uniform() : 0.01 + 0.3 * rng.uniform();
    out.evidence.push_back(f);
  }
  return out;
}

}  // namespace budledger::propose::testing
