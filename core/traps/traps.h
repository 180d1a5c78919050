#pragma once
// budledger::traps — the trap lattice of a position, found from the images
// without knowing the trap's shape: lattice vectors from autocorrelation
// peaks, a template from the lattice average, a centre, row and column and
// stable id per trap, edge flags; or a layout supplied as CSV; and the
// registered crop of any trap at any frame.
#include "core/traps/crops.h"
#include "core/traps/lattice.h"
#include "core/traps/structure_map.h"
#include "core/traps/temporal_median.h"
#include "core/traps/trap_finder.h"
#include "core/traps/trap_layout.h"
#include "core/traps/traps_csv.h"
