#include "core/propose/emission.h"

#include <algorithm>
#include <cmath>
#include <numbers>

namespace budledger::propose {
namespace {

int groupIndex(StateGroup g) { return static_cast<int>(g); }

double gaussian(double x, double mean, double sigma) {
  const double z = (x - mean) / sigma;
  return std::exp(-0.5 * z * z) / (sigma * std::sqrt(2 * std::numbers::pi));
}

// Occupancy scaled likelihood for one state group; also used by the M step.
double occupancyLikelihood(const std::array<double, 4>& row, const std::array<double, 4>& prior,
                           const std::array<double, 4>& q) {
  double l = 0;
  for (int c = 0; c < 4; ++c) l += row[c] * q[c] / prior[c];
  return l;
}

double deadLikelihood(double pDeadGivenGroup, double deadPrior, double look) {
  return pDeadGivenGroup * look / deadPrior + (1 - pDeadGivenGroup) * (1 - look) / (1 - deadPrior);
}

double clampProbability(double p) { return std::clamp(p, 1e-6, 1 - 1e-6); }

// Share of a reading the Gaussian (density) explains against the flat outlier
// component; EM weighs each reading's contribution to the moments by it.
double inlierShare(double density, const EmissionParams& params) {
  const double flat = 1.0 / params.budRatioRange;
  return (1 - params.outlier) * density / ((1 - params.outlier) * density + params.outlier * flat);
}

// Adds a reading x with weight to weighted moment sums.
void addReading(double& weightSum, double& sum, double& squares, double weight, double x) {
  weightSum += weight;
  sum += weight * x;
  squares += weight * x * x;
}

// Mean and spread of weighted observations (weight w, sum, sum of squares),
// shrunk towards a prior mean and spread held with `priorWeight`.
struct Moments {
  double mean;
  double sigma;
};
Moments shrunkMoments(double w, double sum, double sq, double priorMean, double priorSigma,
                      double priorWeight) {
  const double wsum = w + priorWeight;
  const double mean = (sum + priorWeight * priorMean) / wsum;
  const double var =
      (sq - 2 * mean * sum + w * mean * mean + priorWeight * priorSigma * priorSigma) / wsum;
  return {mean, std::sqrt(std::max(0.0, var))};
}

}  // namespace

EmissionParams EmissionParams::defaults(int m, int k) {
  EmissionParams p;
  // Columns: empty, single, budded, crowded.
  p.occupancy[groupIndex(StateGroup::Empty)] = {0.94, 0.03, 0.01, 0.02};
  p.occupancy[groupIndex(StateGroup::Unbudded)] = {0.02, 0.84, 0.09, 0.05};
  p.occupancy[groupIndex(StateGroup::BudNew)] = {0.02, 0.45, 0.48, 0.05};
  p.occupancy[groupIndex(StateGroup::BudYoung)] = {0.02, 0.2, 0.72, 0.06};
  p.occupancy[groupIndex(StateGroup::BudOld)] = {0.01, 0.05, 0.87, 0.07};
  p.occupancy[groupIndex(StateGroup::Dead)] = {0.1, 0.6, 0.25, 0.05};
  p.budRatioMean.resize(static_cast<std::size_t>(m));
  for (int k = 1; k <= m; ++k)
    p.budRatioMean[static_cast<std::size_t>(k - 1)] = 0.06 + 0.4 * (k - 1) / std::max(1, m - 1);
  p.deadLook = {0.05, 0.05, 0.05, 0.05, 0.05, 0.8};
  // No assumption on which way death moves each feature: learned by EM.
  p.morphDeadMean.assign(static_cast<std::size_t>(std::max(1, k)), {0.0, 0.0, 0.0});
  return p;
}

MorphBaseline liveReference(const std::vector<TrapEvidence>& evidence,
                            const std::vector<std::vector<float>>& pLive) {
  std::size_t T = 0;
  for (const auto& e : evidence) T = std::max(T, e.size());
  MorphBaseline out(T, {kMissing, kMissing, kMissing});
  auto median = [](std::vector<double>& v) {
    auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
    std::nth_element(v.begin(), mid, v.end());
    return *mid;
  };
  for (int j = 0; j < kMorphCount; ++j) {
    const auto jj = static_cast<std::size_t>(j);
    std::vector<double> all, frame;
    std::vector<std::vector<double>> perFrame(T);
    for (std::size_t i = 0; i < evidence.size(); ++i)
      for (std::size_t t = 0; t < evidence[i].size(); ++t) {
        const double x = evidence[i][t].morph[jj];
        if (evidence[i][t].informative && isKnown(x) && t < pLive[i].size() && pLive[i][t] > 0.5) {
          all.push_back(x);
          perFrame[t].push_back(x);
        }
      }
    if (all.empty()) continue;
    const double global = median(all);
    for (std::size_t t = 0; t < T; ++t)
      out[t][jj] = perFrame[t].size() >= 5 ? median(perFrame[t]) : global;
  }
  return out;
}

MorphBaseline localBaseline(const TrapEvidence& ev, const std::vector<float>& pLive,
                            double window) {
  const std::size_t T = ev.size();
  MorphBaseline out(T);
  const double decay = std::exp(-1.0 / std::max(1.0, window));
  for (int j = 0; j < kMorphCount; ++j) {
    const auto jj = static_cast<std::size_t>(j);
    // Forward and backward exponential filters of weighted sums, excluding the frame itself.
    std::vector<double> fw(T, 0.0), fs(T, 0.0), bw(T, 0.0), bs(T, 0.0);
    double w = 0, s = 0;
    auto step = [&](std::size_t t) {
      const double v = ev[t].morph[jj];
      const double p = t < pLive.size() ? pLive[t] : 0.0;
      w *= decay;
      s *= decay;
      if (ev[t].informative && isKnown(v)) {
        w += decay * p;
        s += decay * p * v;
      }
    };
    for (std::size_t t = 0; t < T; ++t) {
      fw[t] = w;
      fs[t] = s;
      step(t);
    }
    w = s = 0;
    for (std::size_t t = T; t-- > 0;) {
      bw[t] = w;
      bs[t] = s;
      step(t);
    }
    for (std::size_t t = 0; t < T; ++t) {
      const double weight = fw[t] + bw[t];
      out[t][jj] = weight > 1e-3 ? (fs[t] + bs[t]) / weight : kMissing;
    }
  }
  return out;
}

void initialiseDeadMorphology(EmissionParams& p, const std::vector<TrapEvidence>& evidence,
                              const std::vector<MorphBaseline>& baselines) {
  const std::size_t K = p.morphDeadMean.size();
  for (int j = 0; j < kMorphCount; ++j) {
    const auto jj = static_cast<std::size_t>(j);
    std::vector<double> z;
    for (std::size_t i = 0; i < evidence.size(); ++i)
      for (std::size_t t = 0; t < evidence[i].size(); ++t) {
        const double v = evidence[i][t].morph[jj], b = baselines[i][t][jj];
        if (evidence[i][t].informative && isKnown(v) && isKnown(b)) z.push_back(v - b);
      }
    if (z.size() < 20) continue;
    std::sort(z.begin(), z.end());
    const double lo = z[z.size() / 50], hi = z[z.size() - 1 - z.size() / 50];
    const double mid = z[z.size() / 2];
    const double far = (hi - mid) >= (mid - lo) ? hi : lo;
    for (std::size_t k = 0; k < K; ++k)
      p.morphDeadMean[k][jj] = far * static_cast<double>(k + 1) / static_cast<double>(K);
  }
}

std::vector<double> emissionLogLikelihood(const CycleModel& model, const EmissionParams& params,
                                          const TrapEvidence& evidence,
                                          const MorphBaseline* baseline) {
  const int S = model.stateCount();
  const auto T = evidence.size();
  std::vector<double> out(T * static_cast<std::size_t>(S), 0.0);
  const double eps = params.outlier;
  const double ratioFlat = 1.0 / params.budRatioRange;
  for (std::size_t t = 0; t < T; ++t) {
    const FrameEvidence& f = evidence[t];
    if (!f.informative) continue;
    std::array<double, kStateGroupCount> groupOcc{}, groupDead{};
    for (int g = 0; g < kStateGroupCount; ++g) {
      groupOcc[g] = occupancyLikelihood(params.occupancy[g], params.classPrior, f.occupancy);
      groupDead[g] = isKnown(f.deadLook)
                         ? deadLikelihood(params.deadLook[g], params.deadPrior, f.deadLook)
                         : 1.0;
    }
    // Morphology relative to the live baseline, per feature.
    std::array<double, kMorphCount> z{};
    std::array<bool, kMorphCount> zKnown{};
    for (int j = 0; j < kMorphCount; ++j) {
      const auto jj = static_cast<std::size_t>(j);
      zKnown[jj] = baseline && isKnown(f.morph[jj]) && isKnown((*baseline)[t][jj]);
      if (zKnown[jj]) z[jj] = f.morph[jj] - (*baseline)[t][jj];
    }
    double* row = &out[t * static_cast<std::size_t>(S)];
    for (int s = 0; s < S; ++s) {
      const int g = groupIndex(model.group(s));
      const int deadAge = model.deadAge(s);
      // The mother's measurements: log density as read (valid) and as misread (flat).
      double valid = 0, flatAll = 0;
      for (int j = 0; j < kMorphCount; ++j) {
        const auto jj = static_cast<std::size_t>(j);
        if (!zKnown[jj]) continue;
        const double flat = 1.0 / (16 * params.morphLiveSigma[jj]);
        double dens = flat;
        if (deadAge > 0) {
          dens = gaussian(z[jj], params.morphDeadMean[static_cast<std::size_t>(deadAge - 1)][jj],
                          params.morphDeadSigma[jj]);
          // Death moves each feature one way (the sign of the oldest age's change). A
          // deviation the other way, such as a newcomer smaller than the mothers around
          // her, is no sign of death: a dead state may not explain it better than a live
          // one (the broader dead spread otherwise called newcomers dead on arrival).
          if (z[jj] * params.morphDeadMean.back()[jj] < 0)
            dens = std::min(dens, gaussian(z[jj], 0.0, params.morphLiveSigma[jj]));
        } else if (model.isLive(s))
          dens = gaussian(z[jj], 0.0, params.morphLiveSigma[jj]);
        valid += std::log(std::max(dens, 1e-300));
        flatAll += std::log(flat);
      }
      if (isKnown(f.budRatio)) {
        const int age = model.budAge(s);
        const StateGroup group = model.group(s);
        double dens = ratioFlat;
        if (age > 0)
          dens = gaussian(f.budRatio, params.budRatioMean[static_cast<std::size_t>(age - 1)],
                          params.budRatioSigma);
        else if (group == StateGroup::Unbudded)
          dens = gaussian(f.budRatio, params.budRatioUnbuddedMean, params.budRatioUnbuddedSigma);
        else if (group == StateGroup::Dead)
          dens = gaussian(f.budRatio, params.budRatioDeadMean, params.budRatioDeadSigma);
        // A neighbour pressed against the mother adds to the bud ratio while her own
        // outline is fine: the ratio alone can be wrong, so it has an outlier term of its
        // own (otherwise the only cheap home for such frames is a dead state).
        dens = (1 - params.outlier) * dens + params.outlier * ratioFlat;
        valid += std::log(std::max(dens, 1e-300));
        flatAll += std::log(ratioFlat);
      }
      if (model.stateGroupHasMother(s)) {
        const double a = std::log1p(-params.misread) + valid;
        const double b = std::log(params.misread) + flatAll;
        row[s] += std::max(a, b) + std::log1p(std::exp(-std::abs(a - b)));
      } else {
        row[s] += flatAll;  // no mother: whatever was read is unrelated to the states
      }
      double l = std::log((1 - eps) * groupOcc[g] + eps);
      if (isKnown(f.deadLook)) l += std::log((1 - eps) * groupDead[g] + eps);
      if (isKnown(f.departure) && model.stateGroupHasMother(s)) {
        const bool sep = model.justSeparated(s);
        const double dens =
            sep ? gaussian(f.departure, params.departSeparatedMean, params.departSeparatedSigma)
                : gaussian(f.departure, params.departOtherMean, params.departOtherSigma);
        l += std::log((1 - eps) * dens + eps * ratioFlat);
      }
      row[s] += l;
    }
  }
  return out;
}

EmissionStatistics::EmissionStatistics(int m, int k)
    : ratioW_(static_cast<std::size_t>(m), 0.0),
      ratioSum_(static_cast<std::size_t>(m), 0.0),
      ratioSq_(static_cast<std::size_t>(m), 0.0),
      deadW_(static_cast<std::size_t>(std::max(1, k)), {0.0, 0.0, 0.0}),
      deadSum_(static_cast<std::size_t>(std::max(1, k)), {0.0, 0.0, 0.0}),
      deadSq_(static_cast<std::size_t>(std::max(1, k)), {0.0, 0.0, 0.0}) {}

void EmissionStatistics::add(const CycleModel& model, const EmissionParams& params,
                             const TrapEvidence& evidence,
                             const std::vector<double>& statePosterior,
                             const MorphBaseline* baseline) {
  const int S = model.stateCount();
  for (std::size_t t = 0; t < evidence.size(); ++t) {
    const FrameEvidence& f = evidence[t];
    if (!f.informative) continue;
    const double* gamma = &statePosterior[t * static_cast<std::size_t>(S)];
    for (int s = 0; s < S; ++s) {
      const double w = gamma[s];
      if (w < 1e-6) continue;
      if (baseline) {
        const int deadAge = model.deadAge(s);
        for (int j = 0; j < kMorphCount; ++j) {
          const auto jj = static_cast<std::size_t>(j);
          if (!isKnown(f.morph[jj]) || !isKnown((*baseline)[t][jj])) continue;
          const double z = f.morph[jj] - (*baseline)[t][jj];
          if (deadAge > 0) {
            auto k = static_cast<std::size_t>(deadAge - 1);
            deadW_[k][jj] += w;
            deadSum_[k][jj] += w * z;
            deadSq_[k][jj] += w * z * z;
          } else if (model.isLive(s)) {
            liveW_[jj] += w;
            liveSq_[jj] += w * z * z;
          }
        }
      }
      const int g = groupIndex(model.group(s));
      const double l = occupancyLikelihood(params.occupancy[g], params.classPrior, f.occupancy);
      if (l > 0)
        for (int c = 0; c < 4; ++c)
          occ_[g][c] += w * params.occupancy[g][c] * f.occupancy[c] / params.classPrior[c] / l;
      if (isKnown(f.deadLook)) {
        const double pd = params.deadLook[g];
        const double a = pd * f.deadLook / params.deadPrior;
        const double b = (1 - pd) * (1 - f.deadLook) / (1 - params.deadPrior);
        if (a + b > 0) {
          dead_[g][1] += w * a / (a + b);
          dead_[g][0] += w * b / (a + b);
        }
      }
      if (isKnown(f.departure) && model.stateGroupHasMother(s)) {
        const bool sep = model.justSeparated(s);
        const double dens =
            sep ? gaussian(f.departure, params.departSeparatedMean, params.departSeparatedSigma)
                : gaussian(f.departure, params.departOtherMean, params.departOtherSigma);
        const double inlier = inlierShare(dens, params);
        const std::size_t g = sep ? 0 : 1;
        addReading(departW_[g], departSum_[g], departSq_[g], w * inlier, f.departure);
      }
      const int age = model.budAge(s);
      const StateGroup group = model.group(s);
      if (age == 0 && isKnown(f.budRatio) && group == StateGroup::Unbudded) {
        const double dens =
            gaussian(f.budRatio, params.budRatioUnbuddedMean, params.budRatioUnbuddedSigma);
        addReading(unbuddedW_, unbuddedSum_, unbuddedSq_, w * inlierShare(dens, params),
                   f.budRatio);
      }
      if (age > 0 && isKnown(f.budRatio)) {
        const auto k = static_cast<std::size_t>(age - 1);
        // Down-weight readings the outlier component explains better.
        const double dens = gaussian(f.budRatio, params.budRatioMean[k], params.budRatioSigma);
        const double inlier = inlierShare(dens, params);
        addReading(ratioW_[k], ratioSum_[k], ratioSq_[k], w * inlier, f.budRatio);
      }
    }
  }
}

void EmissionStatistics::merge(const EmissionStatistics& o) {
  for (int g = 0; g < kStateGroupCount; ++g) {
    for (int c = 0; c < 4; ++c) occ_[g][c] += o.occ_[g][c];
    for (int c = 0; c < 2; ++c) dead_[g][c] += o.dead_[g][c];
  }
  for (std::size_t k = 0; k < ratioW_.size() && k < o.ratioW_.size(); ++k) {
    ratioW_[k] += o.ratioW_[k];
    ratioSum_[k] += o.ratioSum_[k];
    ratioSq_[k] += o.ratioSq_[k];
  }
  for (std::size_t g = 0; g < 2; ++g) {
    departW_[g] += o.departW_[g];
    departSum_[g] += o.departSum_[g];
    departSq_[g] += o.departSq_[g];
  }
  unbuddedW_ += o.unbuddedW_;
  unbuddedSum_ += o.unbuddedSum_;
  unbuddedSq_ += o.unbuddedSq_;
  for (int j = 0; j < kMorphCount; ++j) {
    const auto jj = static_cast<std::size_t>(j);
    liveW_[jj] += o.liveW_[jj];
    liveSq_[jj] += o.liveSq_[jj];
    for (std::size_t k = 0; k < deadW_.size() && k < o.deadW_.size(); ++k) {
      deadW_[k][jj] += o.deadW_[k][jj];
      deadSum_[k][jj] += o.deadSum_[k][jj];
      deadSq_[k][jj] += o.deadSq_[k][jj];
    }
  }
}

EmissionParams EmissionStatistics::estimate(const EmissionParams& prior, double priorWeight) const {
  EmissionParams p = prior;
  for (int g = 0; g < kStateGroupCount; ++g) {
    double total = 0;
    std::array<double, 4> row{};
    for (int c = 0; c < 4; ++c) {
      row[c] = occ_[g][c] + priorWeight * prior.occupancy[g][c];
      total += row[c];
    }
    // An empty trap is what the classifier calls empty: its row is not learned, or EM
    // could make "empty" a home for anything the other states explain badly.
    if (g != groupIndex(StateGroup::Empty))
      for (int c = 0; c < 4; ++c) p.occupancy[g][c] = clampProbability(row[c] / total);
    const double dead = dead_[g][1] + priorWeight * prior.deadLook[g];
    const double alive = dead_[g][0] + priorWeight * (1 - prior.deadLook[g]);
    p.deadLook[g] = clampProbability(dead / (dead + alive));
  }
  double sq = 0, w = 0;
  for (std::size_t k = 0; k < ratioW_.size(); ++k) {
    const double pw = priorWeight;
    p.budRatioMean[k] = (ratioSum_[k] + pw * prior.budRatioMean[k]) / (ratioW_[k] + pw);
    sq += ratioSq_[k] - 2 * p.budRatioMean[k] * ratioSum_[k] +
          ratioW_[k] * p.budRatioMean[k] * p.budRatioMean[k];
    w += ratioW_[k];
  }
  const double s2 =
      (sq + priorWeight * prior.budRatioSigma * prior.budRatioSigma) / (w + priorWeight);
  p.budRatioSigma = std::clamp(std::sqrt(std::max(0.0, s2)), 0.02, 0.5);
  // Bud ratio of an unbudded mother, and departures.
  {
    const Moments unbudded =
        shrunkMoments(unbuddedW_, unbuddedSum_, unbuddedSq_, prior.budRatioUnbuddedMean,
                      prior.budRatioUnbuddedSigma, priorWeight);
    p.budRatioUnbuddedMean = std::clamp(unbudded.mean, 0.0, 0.3);
    p.budRatioUnbuddedSigma = std::clamp(unbudded.sigma, 0.03, 0.5);
    // The dead state's bud ratio is not learned (as the empty state's classes are not):
    // where deaths are few, a daughter pressed against a live mother for hours (one big
    // bud that neither grows nor leaves) fits it better than any live state, EM made it
    // their home (mean 0.42, SD 0.31 on a fresh stack against 0.18 where deaths are
    // many), and a quarter of the records split at a false death and arrival.
    const Moments separated =
        shrunkMoments(departW_[0], departSum_[0], departSq_[0], prior.departSeparatedMean,
                      prior.departSeparatedSigma, priorWeight);
    const Moments other = shrunkMoments(departW_[1], departSum_[1], departSq_[1],
                                        prior.departOtherMean, prior.departOtherSigma, priorWeight);
    p.departSeparatedMean = std::clamp(separated.mean, 0.0, 2.0);
    p.departSeparatedSigma = std::clamp(separated.sigma, 0.05, 1.0);
    p.departOtherMean = std::clamp(other.mean, 0.0, 0.5);
    p.departOtherSigma = std::clamp(other.sigma, 0.02, 0.5);
  }
  // Bud ages must keep growing, or the chain could explain a shrinking bud.
  for (std::size_t k = 1; k < p.budRatioMean.size(); ++k)
    p.budRatioMean[k] = std::max(p.budRatioMean[k], p.budRatioMean[k - 1]);

  // Morphology: live spread, and the change after death by dead age. The change may go
  // either way per feature but must not reverse as the corpse ages (pool-adjacent-
  // violators on the weighted means, in the direction the oldest age shows).
  const std::size_t K = deadW_.size();
  p.morphDeadMean.resize(K);
  for (int j = 0; j < kMorphCount; ++j) {
    const auto jj = static_cast<std::size_t>(j);
    const double priorSigma = prior.morphLiveSigma[jj];
    if (liveW_[jj] > 1)
      p.morphLiveSigma[jj] =
          std::max(1e-6, std::sqrt((liveSq_[jj] + priorWeight * priorSigma * priorSigma) /
                                   (liveW_[jj] + priorWeight)));
    std::vector<double> mean(K), weight(K);
    double totalW = 0, sq = 0;
    for (std::size_t k = 0; k < K; ++k) {
      weight[k] = deadW_[k][jj] + 1.0;  // one pseudo-frame at zero change
      mean[k] = deadSum_[k][jj] / weight[k];
      totalW += deadW_[k][jj];
    }
    const double direction = mean[K - 1] >= 0 ? 1.0 : -1.0;
    // PAV for a non-decreasing sequence of direction * mean.
    std::vector<double> level, lw;
    std::vector<std::size_t> count;
    for (std::size_t k = 0; k < K; ++k) {
      level.push_back(direction * mean[k]);
      lw.push_back(weight[k]);
      count.push_back(1);
      while (level.size() > 1 && level[level.size() - 2] > level.back()) {
        const double w2 = lw.back() + lw[lw.size() - 2];
        const double v =
            (level.back() * lw.back() + level[level.size() - 2] * lw[lw.size() - 2]) / w2;
        const std::size_t c = count.back() + count[count.size() - 2];
        level.pop_back();
        lw.pop_back();
        count.pop_back();
        level.back() = v;
        lw.back() = w2;
        count.back() = c;
      }
    }
    std::size_t k = 0;
    for (std::size_t b = 0; b < level.size(); ++b)
      for (std::size_t i = 0; i < count[b]; ++i, ++k) p.morphDeadMean[k][jj] = direction * level[b];
    for (std::size_t kk = 0; kk < K; ++kk) {
      const double mu = p.morphDeadMean[kk][jj];
      sq += deadSq_[kk][jj] - 2 * mu * deadSum_[kk][jj] + deadW_[kk][jj] * mu * mu;
    }
    if (totalW > 1)
      p.morphDeadSigma[jj] = std::max(
          0.5 * p.morphLiveSigma[jj],
          std::sqrt((sq + priorWeight * priorSigma * priorSigma) / (totalW + priorWeight)));
    else
      p.morphDeadSigma[jj] = p.morphLiveSigma[jj];
  }
  return p;
}

}  // namespace budledger::propose
