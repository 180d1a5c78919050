#pragma once
// budledger::stats — lifespan statistics over divisions, matching R survival
// 3.5-3 in its conventions (docs/statistics.md):
//  - Lifespan, Cohort: the input record and its tally by group and stratum,
//    updatable one edit at a time (lifespan.h, cohort.h);
//  - Kaplan–Meier curves with Greenwood errors, log / log-log / plain
//    pointwise intervals, censor marks and numbers at risk (kaplan_meier.h);
//  - median and other quantiles with Brookmeyer–Crowley intervals
//    (quantiles.h); restricted mean lifespan with its error (restricted_mean.h);
//  - log-rank, stratified and Peto–Peto-weighted, for any number of groups
//    (log_rank.h); Cox proportional hazards with Efron ties, hazard ratios by
//    group (cox.h);
//  - Gompertz and Weibull maximum-likelihood fits with censoring, observed-
//    information errors and AIC (gompertz.h, weibull.h);
//  - the division-interval profile by age and before death
//    (division_intervals.h); normal and chi-square tails (distributions.h).
#include "core/stats/cohort.h"
#include "core/stats/cox.h"
#include "core/stats/distributions.h"
#include "core/stats/division_intervals.h"
#include "core/stats/gompertz.h"
#include "core/stats/kaplan_meier.h"
#include "core/stats/lifespan.h"
#include "core/stats/log_rank.h"
#include "core/stats/quantiles.h"
#include "core/stats/restricted_mean.h"
#include "core/stats/weibull.h"
