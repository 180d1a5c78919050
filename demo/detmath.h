#pragma once
// Deterministic elementary functions for the simulator. The C library's exp,
// log, sin and cos may differ in the last bit between library versions and
// CPUs; a seeded scenario must give byte-identical output everywhere, so every
// transcendental value the simulator uses comes from here: range reduction
// with exact steps (frexp/ldexp, multiples of ln 2 and pi) and fixed
// polynomials evaluated in a fixed order, in IEEE double arithmetic only.
// Accuracy is about 1e-15 relative, far below anything the model resolves.

namespace budledger::demo::detmath {

inline constexpr double kPi = 3.14159265358979323846;

double exp(double x);
double log(double x);  // x > 0
double sin(double x);
double cos(double x);
double pow(double base, double exponent);  // base > 0
double cbrt(double x);                     // x >= 0
double atan2(double y, double x);

}  // namespace budledger::demo::detmath
