#pragma once
// Weibull fit to right-censored lifespans by maximum likelihood:
// S(t) = exp(−(t/scale)^shape). Standard errors from the observed information
// in the log-scale parameters (log scale, log σ with σ = 1/shape), as R
// survival 3.5-3 survreg(dist = "weibull") reports them, then carried to shape
// and scale by the delta method. The log-likelihood is that of the lifespans
// themselves (the density of t, not of log t), so AICs compare with Gompertz.
//
// The Weibull density is 0 or infinite at t = 0, so lifespans of 0 divisions
// are left out (counted in `excludedAtZero`); R's survreg refuses them too.
// The shape is found as the root of the profile score, which is strictly
// increasing, so the fit cannot stop short on a flat likelihood.
#include <string>

#include "core/stats/cohort.h"

namespace budledger::stats {

struct WeibullFit {
  bool estimable = false;
  std::string problem;
  long n = 0;  // lifespans used (divisions > 0)
  long events = 0;
  long excludedAtZero = 0;
  int iterations = 0;
  double shape = 0.0, shapeStdErr = 0.0;
  double scale = 0.0, scaleStdErr = 0.0;
  double logScale = 0.0, logScaleStdErr = 0.0;  // survreg's (Intercept)
  double logSigma = 0.0, logSigmaStdErr = 0.0;  // survreg's Log(scale)
  double covLogScaleLogSigma = 0.0;
  double logLik = 0.0;
  double aic = 0.0;
};

WeibullFit fitWeibull(const Tally& tally);

}  // namespace budledger::stats
