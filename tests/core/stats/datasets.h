#pragma once
// Published data sets typed in for the statistics tests, with their sources.
#include <string>
#include <vector>

#include "core/stats/cohort.h"
#include "core/stats/lifespan.h"

namespace budledger::stats::testdata {

struct Obs {
  int time;
  bool event;
};

inline std::vector<Lifespan> lifespans(const std::vector<Obs>& obs, const std::string& group,
                                       const std::string& stratum = {}) {
  std::vector<Lifespan> out;
  for (const auto& o : obs) out.push_back({o.time, o.event, group, stratum});
  return out;
}

inline std::vector<Lifespan> concat(std::vector<Lifespan> a, const std::vector<Lifespan>& b) {
  a.insert(a.end(), b.begin(), b.end());
  return a;
}

// 6-MP arm of the leukaemia remission trial, weeks; false = censored.
// Freireich et al. (1963), Blood 21:699–716, as tabulated by Gehan (1965),
// Biometrika 52:203–223.
inline const std::vector<Obs> kSixMp = {
    {6, true},   {6, true},   {6, true},   {6, false},  {7, true},   {9, false},  {10, true},
    {10, false}, {11, false}, {13, true},  {16, true},  {17, false}, {19, false}, {20, false},
    {22, true},  {23, true},  {25, false}, {32, false}, {32, false}, {34, false}, {35, false}};

// Placebo arm of the same trial (all relapsed).
inline const std::vector<Obs> kPlacebo = {
    {1, true},  {1, true},  {2, true},  {2, true},  {3, true},  {4, true},  {4, true},
    {5, true},  {5, true},  {8, true},  {8, true},  {8, true},  {8, true},  {11, true},
    {11, true}, {12, true}, {12, true}, {15, true}, {17, true}, {22, true}, {23, true}};

// Acute myelogenous leukaemia maintenance data: Miller (1981), Survival
// Analysis, Wiley (the `aml` data of R survival).
inline const std::vector<Obs> kAmlMaintained = {{9, true},   {13, true},  {13, false}, {18, true},
                                                {23, true},  {28, false}, {31, true},  {34, true},
                                                {45, false}, {48, true},  {161, false}};
inline const std::vector<Obs> kAmlNonmaintained = {{5, true},  {5, true},   {8, true},  {8, true},
                                                   {12, true}, {16, false}, {23, true}, {27, true},
                                                   {30, true}, {33, true},  {43, true}, {45, true}};

inline Tally tallyOf(const std::vector<Obs>& obs) {
  return Cohort(lifespans(obs, "x")).groupTally(0);
}

}  // namespace budledger::stats::testdata
