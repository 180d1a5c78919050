#pragma once
// The drift track of one position: for every frame, where the chip has moved
// to relative to frame 0. Convention: a point at p in frame 0 appears at
// p + (dx, dy) in frame k, so frame k's crop of a trap centred at c (frame-0
// pixels) is centred at c + (dx, dy).
#include <cstdint>
#include <vector>

namespace budledger::registration {

struct FrameDrift {
  enum Flag : std::uint8_t {
    kNone = 0,
    kInterpolated = 1,  // not measurable (blur, flicker, debris): filled in from neighbours
    kJump = 2,          // the stage moved abruptly before this frame
    kReference = 4,     // the frame the movie was registered against
  };
  int frame = 0;
  double dx = 0, dy = 0;
  // How far the measurement can be trusted, in [0, 1]: how well the frame's
  // structure matches the reference once aligned (`match`) relative to the
  // movie's median match, capped at 1, times min(1, focus / 0.5), halved when
  // the refinement failed; at most 0.3 for an interpolated frame.
  double confidence = 0;
  // Sharpness relative to the movie's median frame (1 = typical, < 0.5 = blurred).
  double focus = 0;
  double rawFocus = 0;  // normalised gradient energy, see focusMeasure()
  double match = 0;     // weighted correlation of the aligned structure, in [-1, 1]
  std::uint8_t flags = kNone;
};

using DriftTrack = std::vector<FrameDrift>;

}  // namespace budledger::registration
