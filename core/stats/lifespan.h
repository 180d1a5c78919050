#pragma once
// Lifespan: the one input record of budledger::stats — a mother's completed
// divisions, whether the tenure ended in death (event) or was right-censored
// (washout, end of imaging), and the labels that place it in a group (strain,
// condition) and a stratum (chip, run). Labels are plain strings; the empty
// string is a label like any other.
#include <string>

namespace budledger::stats {

struct Lifespan {
  int divisions = 0;   // completed divisions (RLS), >= 0
  bool event = false;  // true: death observed; false: right-censored
  std::string group;
  std::string stratum;
};

// Throws InputError when `l` cannot be a lifespan (negative divisions).
void checkLifespan(const Lifespan& l);

}  // namespace budledger::stats
