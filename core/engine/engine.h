#pragma once
// budledger::engine — the engine over one position: measure, classify and
// propose from registered trap crops (position_engine.h).
#include "core/engine/engine_stage.h"
#include "core/engine/position_engine.h"
