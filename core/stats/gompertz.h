#pragma once
// Gompertz fit to right-censored lifespans by maximum likelihood: hazard
// h(t) = b·e^{a·t}, b the initial mortality (per division), a the rate, ln 2 / a
// the mortality-rate doubling time in divisions. Survival
// S(t) = exp(−(b/a)(e^{a t} − 1)), which tends to the exponential as a → 0.
//
// The fit maximises the profile likelihood in a, with b̂(a) = d·a / Σ(e^{a t} − 1);
// that profile is concave (log of a Laplace transform is convex), so a
// bracketed Newton search on its derivative finds the one maximum even where
// the likelihood is nearly flat around a ≈ 0, and the functions (e^{x} − 1)/x
// and their derivatives are evaluated by series near x = 0 rather than by
// cancelling differences. a may come out negative (a falling hazard); the
// doubling time is then undefined. Standard errors from the observed
// information in (a, b).
#include <optional>
#include <string>

#include "core/stats/cohort.h"

namespace budledger::stats {

struct GompertzFit {
  bool estimable = false;
  std::string problem;
  long n = 0;
  long events = 0;
  int iterations = 0;
  double rate = 0.0, rateStdErr = 0.0;                          // a
  double initialMortality = 0.0, initialMortalityStdErr = 0.0;  // b
  double covRateInitial = 0.0;
  std::optional<double> doublingTime, doublingTimeStdErr;  // ln 2 / a, for a > 0
  double logLik = 0.0;
  double aic = 0.0;
};

GompertzFit fitGompertz(const Tally& tally);

// The profile likelihood at a fixed rate a, with b̂(a) = d·a / Σ(e^{a t} − 1):
// for plotting the likelihood's shape; at a = 0 it is the exponential fit.
struct GompertzProfilePoint {
  double rate = 0.0;
  double initialMortality = 0.0;
  double logLik = 0.0;
};
GompertzProfilePoint gompertzProfile(const Tally& tally, double rate);

// Density, survival and hazard of the Gompertz distribution (for plots and tests).
double gompertzDensity(double t, double rate, double initialMortality);
double gompertzSurvival(double t, double rate, double initialMortality);

}  // namespace budledger::stats
