#include "core/evaluate/score.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <iterator>
#include <limits>
#include <map>
#include <nlohmann/json.hpp>

#include "core/lineage/lineage.h"

namespace budledger::evaluate {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Maximum one-to-one matching of two sorted frame lists within +-tol: the greedy
// two-pointer sweep is optimal for equal tolerance windows on a line.
// Returns, for each engine frame, whether it was matched; `matched` counts pairs.
std::vector<bool> matchFrames(const std::vector<int>& truth, const std::vector<int>& engine,
                              int tol, int& matched, std::vector<bool>& truthMatched) {
  std::vector<bool> engineMatched(engine.size(), false);
  truthMatched.assign(truth.size(), false);
  matched = 0;
  std::size_t i = 0, j = 0;
  while (i < truth.size() && j < engine.size()) {
    if (std::abs(truth[i] - engine[j]) <= tol) {
      engineMatched[j] = truthMatched[i] = true;
      ++matched;
      ++i;
      ++j;
    } else if (engine[j] < truth[i]) {
      ++j;
    } else {
      ++i;
    }
  }
  return engineMatched;
}

double median(std::vector<double> v) {
  if (v.empty()) return 0;
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

// Trap pitch from the truth lattice: median nearest-neighbour distance.
double latticePitch(const std::vector<TruthTrap>& traps) {
  std::vector<double> nn;
  for (const auto& a : traps) {
    double best = std::numeric_limits<double>::infinity();
    for (const auto& b : traps)
      if (&a != &b) best = std::min(best, std::hypot(a.x - b.x, a.y - b.y));
    if (std::isfinite(best)) nn.push_back(best);
  }
  return nn.empty() ? std::numeric_limits<double>::infinity() : median(nn);
}

}  // namespace

// truth trap index -> engine trap index (or -1).
std::vector<int> pairTraps(const std::vector<TruthTrap>& truth,
                           const std::vector<EngineTrap>& engine) {
  std::vector<int> pairOf(truth.size(), -1);
  if (truth.empty() || engine.empty()) return pairOf;
  const double radius = 0.5 * latticePitch(truth);
  auto nearest = [&](double x, double y) {
    std::size_t best = 0;
    double bestD = std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < truth.size(); ++i) {
      const double d = std::hypot(truth[i].x - x, truth[i].y - y);
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    }
    return best;
  };
  std::vector<double> dx, dy;
  for (const auto& e : engine) {
    const auto& t = truth[nearest(e.x, e.y)];
    dx.push_back(e.x - t.x);
    dy.push_back(e.y - t.y);
  }
  const double ox = median(dx), oy = median(dy);
  struct Candidate {
    double d;
    std::size_t t, e;
  };
  std::vector<Candidate> cands;
  for (std::size_t e = 0; e < engine.size(); ++e)
    for (std::size_t t = 0; t < truth.size(); ++t) {
      const double d = std::hypot(engine[e].x - ox - truth[t].x, engine[e].y - oy - truth[t].y);
      if (d <= radius) cands.push_back({d, t, e});
    }
  std::sort(cands.begin(), cands.end(),
            [](const Candidate& a, const Candidate& b) { return a.d < b.d; });
  std::vector<bool> engineUsed(engine.size(), false);
  for (const auto& c : cands)
    if (pairOf[c.t] < 0 && !engineUsed[c.e]) {
      pairOf[c.t] = static_cast<int>(c.e);
      engineUsed[c.e] = true;
    }
  return pairOf;
}

namespace {

struct Accumulator {
  Score s;
  std::vector<std::pair<double, bool>> confidences;  // engine event: confidence, correct
  std::vector<std::pair<int, bool>> kmTruth, kmEngine;
  double absErr = 0, signedErr = 0;
};

// Scores one trap pair; either side may be absent (empty lists).
void scoreTrap(const std::vector<TruthEvent>& tEvents, const std::vector<TruthTenure>& tTenures,
               const std::vector<Event>& eEvents, int frames, int tol, Accumulator& acc) {
  for (EventKind kind : kAllEventKinds) {
    std::vector<int> tf, ef;
    std::vector<double> econf;
    for (const auto& e : tEvents)
      if (e.kind == kind) tf.push_back(e.frame);
    std::vector<Event> ek;
    for (const auto& e : eEvents)
      if (e.kind == kind) ek.push_back(e);
    std::sort(tf.begin(), tf.end());
    std::sort(ek.begin(), ek.end(),
              [](const Event& a, const Event& b) { return a.frame < b.frame; });
    for (const auto& e : ek) ef.push_back(e.frame);
    int matched = 0;
    std::vector<bool> truthMatched;
    const auto engineMatched = matchFrames(tf, ef, tol, matched, truthMatched);
    KindScore& k = acc.s.kinds[static_cast<std::size_t>(kind)];
    k.truth += static_cast<int>(tf.size());
    k.engine += static_cast<int>(ef.size());
    k.matched += matched;
    const int leftTruth = static_cast<int>(tf.size()) - matched;
    const int leftEngine = static_cast<int>(ef.size()) - matched;
    const int moves = std::min(leftTruth, leftEngine);
    k.moves += moves;
    k.adds += leftTruth - moves;
    k.deletes += leftEngine - moves;
    for (std::size_t i = 0; i < ek.size(); ++i)
      acc.confidences.emplace_back(ek[i].confidence, engineMatched[i]);
    if (kind == EventKind::Separation) acc.s.trueDivisions += static_cast<int>(tf.size());
  }

  // Mothers: each engine tenure belongs to the true tenure it overlaps most.
  const auto engine = lineage::tenuresFromEvents(eEvents, frames).tenures;
  std::vector<int> owner(engine.size(), -1);
  for (std::size_t e = 0; e < engine.size(); ++e) {
    int best = 0;
    for (std::size_t t = 0; t < tTenures.size(); ++t) {
      const int overlap = std::min(engine[e].lastFrame, tTenures[t].lastFrame) -
                          std::max(engine[e].firstFrame, tTenures[t].firstFrame) + 1;
      if (overlap > best) {
        best = overlap;
        owner[e] = static_cast<int>(t);
      }
    }
    if (owner[e] < 0) ++acc.s.spurious;
    acc.kmEngine.emplace_back(engine[e].divisions, engine[e].outcome == Outcome::Death);
  }
  for (std::size_t t = 0; t < tTenures.size(); ++t) {
    const TruthTenure& truth = tTenures[t];
    acc.kmTruth.emplace_back(truth.divisions, truth.died);
    int records = 0, primary = -1, primaryOverlap = 0;
    for (std::size_t e = 0; e < engine.size(); ++e) {
      if (owner[e] != static_cast<int>(t)) continue;
      ++records;
      const int overlap = std::min(engine[e].lastFrame, truth.lastFrame) -
                          std::max(engine[e].firstFrame, truth.firstFrame) + 1;
      if (overlap > primaryOverlap) {
        primaryOverlap = overlap;
        primary = static_cast<int>(e);
      }
    }
    ++acc.s.mothers;
    if (records == 0) ++acc.s.missing;
    if (records == 1) ++acc.s.oneRecord;
    if (records > 1) ++acc.s.split;
    const int divisions = primary >= 0 ? engine[static_cast<std::size_t>(primary)].divisions : 0;
    const int err = divisions - truth.divisions;
    acc.s.exact += err == 0;
    acc.absErr += std::abs(err);
    acc.signedErr += err;
  }
}

}  // namespace

double kaplanMeierMedian(const std::vector<std::pair<int, bool>>& data) {
  std::map<int, std::pair<int, int>> at;  // divisions -> (deaths, censored)
  for (const auto& [d, died] : data) (died ? at[d].first : at[d].second)++;
  double survival = 1;
  int atRisk = static_cast<int>(data.size());
  for (auto it = at.begin(); it != at.end(); ++it) {
    const auto& [d, counts] = *it;
    // A censored count tied with deaths stays at risk at that count (common practice).
    if (counts.first > 0 && atRisk > 0) {
      survival *= 1.0 - static_cast<double>(counts.first) / atRisk;
      if (std::abs(survival - 0.5) < 1e-12) {
        // S is exactly one half on a flat stretch: the midpoint to the next death, as R does.
        for (auto next = std::next(it); next != at.end(); ++next)
          if (next->second.first > 0) return 0.5 * (d + next->first);
        return d;
      }
      if (survival < 0.5) return d;
    }
    atRisk -= counts.first + counts.second;
  }
  return kNaN;
}

Score score(const Truth& truth, const std::vector<EnginePosition>& engine,
            const ScoreOptions& options) {
  Accumulator acc;
  auto findEngine = [&](const TruthPosition& p) -> const EnginePosition* {
    const std::string stem = std::filesystem::path(p.file).stem().stem().string();
    for (const auto& e : engine)
      if (e.name == p.name) return &e;
    for (const auto& e : engine)
      if (e.name == stem || std::filesystem::path(e.name).stem().stem().string() == stem) return &e;
    return nullptr;
  };
  for (const TruthPosition& tp : truth.positions) {
    const EnginePosition* ep = findEngine(tp);
    if (!ep && options.skipMissingPositions) {
      acc.s.notes.push_back(fmt::format("position {}: not in the project, not scored", tp.name));
      continue;
    }
    if (!ep) acc.s.notes.push_back(fmt::format("position {}: not in the project", tp.name));
    const std::vector<EngineTrap> noTraps;
    const auto& eTraps = ep ? ep->traps : noTraps;
    const auto pairOf = pairTraps(tp.traps, eTraps);
    acc.s.trapsTruth += static_cast<int>(tp.traps.size());
    acc.s.trapsEngine += static_cast<int>(eTraps.size());
    std::vector<bool> engineUsed(eTraps.size(), false);
    auto engineEventsOf = [&](int trapId) {
      std::vector<Event> out;
      if (ep)
        for (const auto& e : ep->events)
          if (e.trap == trapId) out.push_back(e);
      return out;
    };
    for (std::size_t i = 0; i < tp.traps.size(); ++i) {
      const int trapId = tp.traps[i].trap;
      std::vector<TruthEvent> te;
      std::vector<TruthTenure> tt;
      for (const auto& e : tp.events)
        if (e.trap == trapId) te.push_back(e);
      for (const auto& t : tp.tenures)
        if (t.trap == trapId) tt.push_back(t);
      std::vector<Event> ee;
      if (pairOf[i] >= 0) {
        engineUsed[static_cast<std::size_t>(pairOf[i])] = true;
        ++acc.s.trapsMatched;
        ee = engineEventsOf(eTraps[static_cast<std::size_t>(pairOf[i])].trap);
      }
      scoreTrap(te, tt, ee, tp.frames, options.tolerance, acc);
    }
    for (std::size_t e = 0; e < eTraps.size(); ++e)
      if (!engineUsed[e])
        scoreTrap({}, {}, engineEventsOf(eTraps[e].trap), tp.frames, options.tolerance, acc);
  }

  Score& s = acc.s;
  if (s.mothers) {
    s.mae = acc.absErr / s.mothers;
    s.bias = acc.signedErr / s.mothers;
  }
  s.kmMedianTruth = kaplanMeierMedian(acc.kmTruth);
  s.kmMedianEngine = kaplanMeierMedian(acc.kmEngine);
  for (const auto& k : s.kinds) s.edits += k.edits();
  s.editsPer100 = s.trueDivisions ? 100.0 * s.edits / s.trueDivisions : 0;

  const auto& edges = options.reliabilityEdges;
  for (std::size_t b = 0; b + 1 < edges.size(); ++b) {
    ReliabilityBin bin;
    bin.lo = edges[b];
    bin.hi = edges[b + 1];
    double sum = 0;
    for (const auto& [c, ok] : acc.confidences) {
      const bool last = b + 2 == edges.size();
      if (c >= bin.lo && (c < bin.hi || (last && c <= bin.hi))) {
        ++bin.count;
        bin.correct += ok;
        sum += c;
      }
    }
    bin.meanConfidence = bin.count ? sum / bin.count : 0;
    s.reliability.push_back(bin);
  }
  const double n = static_cast<double>(acc.confidences.size());
  for (const auto& bin : s.reliability)
    if (bin.count)
      s.calibrationError +=
          bin.count / n *
          std::abs(bin.meanConfidence - static_cast<double>(bin.correct) / bin.count);
  return s;
}

std::string toMarkdown(const Score& s) {
  std::string out;
  auto num = [](double v) {
    return std::isnan(v) ? std::string("not reached") : fmt::format("{:g}", v);
  };
  out += "| kind | truth | engine | matched | precision | recall | F1 | edits |\n";
  out += "|---|---:|---:|---:|---:|---:|---:|---:|\n";
  for (EventKind k : kAllEventKinds) {
    const KindScore& ks = s.kind(k);
    out += fmt::format("| {} | {} | {} | {} | {:.3f} | {:.3f} | {:.3f} | {} |\n", toString(k),
                       ks.truth, ks.engine, ks.matched, ks.precision(), ks.recall(), ks.f1(),
                       ks.edits());
  }
  out += "\n| measure | value |\n|---|---:|\n";
  out += fmt::format("| traps (truth / engine / paired) | {} / {} / {} |\n", s.trapsTruth,
                     s.trapsEngine, s.trapsMatched);
  out += fmt::format("| mothers (true tenures) | {} |\n", s.mothers);
  out += fmt::format("| RLS exact | {:.1f}% ({}) |\n", 100 * s.exactRate(), s.exact);
  out += fmt::format("| RLS mean absolute error | {:.3f} |\n", s.mae);
  out += fmt::format("| RLS bias (engine - truth) | {:+.3f} |\n", s.bias);
  out += fmt::format("| one record per true tenure | {} of {} (split {}, missing {}) |\n",
                     s.oneRecord, s.mothers, s.split, s.missing);
  out += fmt::format("| spurious records | {} |\n", s.spurious);
  out += fmt::format("| KM median RLS truth / engine | {} / {} |\n", num(s.kmMedianTruth),
                     num(s.kmMedianEngine));
  out += fmt::format("| review edits per 100 true divisions | {:.2f} ({} edits, {} divisions) |\n",
                     s.editsPer100, s.edits, s.trueDivisions);
  out += fmt::format("| expected calibration error | {:.3f} |\n", s.calibrationError);
  out += "\n| confidence | events | mean confidence | correct |\n|---|---:|---:|---:|\n";
  for (const auto& b : s.reliability)
    out += fmt::format(
        "| {:.2f}-{:.2f} | {} | {} | {} |\n", b.lo, b.hi, b.count,
        b.count ? fmt::format("{:.3f}", b.meanConfidence) : "-",
        b.count ? fmt::format("{:.3f}", static_cast<double>(b.correct) / b.count) : "-");
  for (const auto& n : s.notes) out += fmt::format("\nNote: {}\n", n);
  return out;
}

std::string toJson(const Score& s) {
  nlohmann::json j;
  auto num = [](double v) { return std::isnan(v) ? nlohmann::json(nullptr) : nlohmann::json(v); };
  for (EventKind k : kAllEventKinds) {
    const KindScore& ks = s.kind(k);
    j["kinds"][std::string(toString(k))] = {
        {"truth", ks.truth},           {"engine", ks.engine},   {"matched", ks.matched},
        {"precision", ks.precision()}, {"recall", ks.recall()}, {"f1", ks.f1()},
        {"moves", ks.moves},           {"deletes", ks.deletes}, {"adds", ks.adds}};
  }
  j["traps"] = {{"truth", s.trapsTruth}, {"engine", s.trapsEngine}, {"paired", s.trapsMatched}};
  j["mothers"] = {{"count", s.mothers}, {"exact", s.exact},     {"exact_rate", s.exactRate()},
                  {"mae", s.mae},       {"bias", s.bias},       {"one_record", s.oneRecord},
                  {"split", s.split},   {"missing", s.missing}, {"spurious", s.spurious}};
  j["km_median"] = {{"truth", num(s.kmMedianTruth)}, {"engine", num(s.kmMedianEngine)}};
  j["review"] = {{"edits", s.edits},
                 {"true_divisions", s.trueDivisions},
                 {"edits_per_100_divisions", s.editsPer100}};
  j["calibration_error"] = s.calibrationError;
  for (const auto& b : s.reliability)
    j["reliability"].push_back({{"lo", b.lo},
                                {"hi", b.hi},
                                {"count", b.count},
                                {"correct", b.correct},
                                {"mean_confidence", b.meanConfidence}});
  j["notes"] = s.notes;
  return j.dump(2);
}

}  // namespace budledger::evaluate
