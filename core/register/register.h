#pragma once
// budledger::registration — stage drift: per-frame translation of a movie
// against a reference frame, measured on the chip's static structure with a
// bounded, continuity-guided phase correlation and a sub-pixel refinement,
// with a per-frame confidence and focus measure.
#include "core/register/drift.h"
#include "core/register/drift_tracker.h"
#include "core/register/features.h"
#include "core/register/phase_correlation.h"
#include "core/register/refine.h"
#include "core/register/registrar.h"
