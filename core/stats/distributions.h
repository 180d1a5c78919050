#pragma once
// The few distribution functions the tests and intervals need, computed to
// near double precision so that p-values and interval ends agree with R's
// pnorm/qnorm/pchisq to far better than 1e-8 relative, also far in the tails.
namespace budledger::stats {

// Standard normal upper-tail probability P(Z > z).
double normalUpperTail(double z);

// Standard normal quantile: z with P(Z <= z) = p, for 0 < p < 1.
double normalQuantile(double p);

// z for a two-sided interval of the given level, e.g. 1.959963984540054 for 0.95.
double twoSidedZ(double level);

// Upper tail P(X > x) of the chi-square distribution with df > 0 degrees of freedom.
double chiSquareUpperTail(double x, double df);

// Regularised upper incomplete gamma function Q(s, x) = Γ(s, x) / Γ(s).
double regularizedGammaQ(double s, double x);

}  // namespace budledger::stats
