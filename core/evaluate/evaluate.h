#pragma once
// budledger::evaluate — scoring engine calls against simulator truth.
//  - truth.h: reading the simulator's truth folder
//  - score.h: matching and the accuracy measures of the Engine issue
#include "core/evaluate/score.h"
#include "core/evaluate/truth.h"
