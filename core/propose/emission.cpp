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

}  // namespace

EmissionParams EmissionParams::defaults(int m) {
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
  return p;
}

std::vector<double> emissionLogLikelihood(const CycleModel& model, const EmissionParams& params,
                                          const TrapEvidence& evidence) {
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
    double* row = &out[t * static_cast<std::size_t>(S)];
    for (int s = 0; s < S; ++s) {
      const int g = groupIndex(model.group(s));
      double l = std::log((1 - eps) * groupOcc[g] + eps);
      if (isKnown(f.deadLook)) l += std::log((1 - eps) * groupDead[g] + eps);
      if (isKnown(f.budRatio)) {
        const int age = model.budAge(s);
        const double dens =
            age > 0 ? gaussian(f.budRatio, params.budRatioMean[static_cast<std::size_t>(age - 1)],
                               params.budRatioSigma)
                    : ratioFlat;
        l += std::log((1 - eps) * dens + eps * ratioFlat);
      }
      row[s] = l;
    }
  }
  return out;
}

EmissionStatistics::EmissionStatistics(int m)
    : ratioW_(static_cast<std::size_t>(m), 0.0),
      ratioSum_(static_cast<std::size_t>(m), 0.0),
      ratioSq_(static_cast<std::size_t>(m), 0.0) {}

void EmissionStatistics::add(const CycleModel& model, const EmissionParams& params,
                             const TrapEvidence& evidence,
                             const std::vector<double>& statePosterior) {
  const int S = model.stateCount();
  for (std::size_t t = 0; t < evidence.size(); ++t) {
    const FrameEvidence& f = evidence[t];
    if (!f.informative) continue;
    const double* gamma = &statePosterior[t * static_cast<std::size_t>(S)];
    for (int s = 0; s < S; ++s) {
      const double w = gamma[s];
      if (w < 1e-6) continue;
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
      const int age = model.budAge(s);
      if (age > 0 && isKnown(f.budRatio)) {
        const auto k = static_cast<std::size_t>(age - 1);
        // Down-weight readings the outlier component explains better.
        const double dens = gaussian(f.budRatio, params.budRatioMean[k], params.budRatioSigma);
        const double flat = 1.0 / params.budRatioRange;
        const double inlier =
            (1 - params.outlier) * dens / ((1 - params.outlier) * dens + params.outlier * flat);
        ratioW_[k] += w * inlier;
        ratioSum_[k] += w * inlier * f.budRatio;
        ratioSq_[k] += w * inlier * f.budRatio * f.budRatio;
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
  // Bud ages must keep growing, or the chain could explain a shrinking bud.
  for (std::size_t k = 1; k < p.budRatioMean.size(); ++k)
    p.budRatioMean[k] = std::max(p.budRatioMean[k], p.budRatioMean[k - 1]);
  return p;
}

}  // namespace budledger::propose
