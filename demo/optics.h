#pragma once
// Optics: brightfield image formation for one position. The specimen is an
// optical-path map (posts of PDMS, cells of cytoplasm, in µm of path
// difference) plus an absorption map. A slightly defocused brightfield image is
// modelled with the transport-of-intensity approximation, I ≈ I0·(1 − z·∇²φ):
// rims and interiors of opposite sign, the side set by the focus (polarity);
// light refracted out of the aperture at steep slopes darkens edges (∝ |∇φ|²);
// a wide difference-of-Gaussians term gives the halo. Then uneven illumination
// and dust fixed to the camera, lamp flicker, a few defocused frames, stage
// drift with jumps, and Poisson–Gaussian camera noise quantised to 16 bits.
// All filtering is done here in plain IEEE float arithmetic (no library SIMD
// dispatch), so a frame is bit-identical on every machine.
#include <cstdint>
#include <vector>

#include "demo/device.h"
#include "demo/rng.h"
#include "demo/scenario.h"
#include "demo/scene.h"

namespace budledger::demo {

class Renderer {
 public:
  Renderer(const Device& device, const OpticsParams& optics, int frames, Rng rng);

  int width() const { return w_; }
  int height() const { return h_; }
  // True stage shift of frame k relative to frame 0 (px): a point of the chip
  // at p in frame 0 is at p + drift(k) in frame k.
  const std::vector<Vec2>& drift() const { return drift_; }
  bool defocused(int frame) const { return defocus_[static_cast<std::size_t>(frame)] > 0.0; }

  // Renders frame `frame` with the given cell bodies into `out` (w×h, row-major).
  void render(int frame, const std::vector<CellBody>& cells, std::vector<std::uint16_t>& out);

 private:
  void makeDrift(Rng& rng, int frames);
  void makeIllumination(Rng& rng);
  void addChipTexture(Rng& rng);
  void shiftPosts(Vec2 d);
  void drawCell(const CellBody& c);

  const Device& device_;
  OpticsParams p_;
  Rng noiseRng_;
  int w_ = 0, h_ = 0;
  int margin_ = 0;
  int cw_ = 0, ch_ = 0;
  std::vector<float> posts_;  // optical path of the posts on the padded canvas
  std::vector<float> illum_;
  std::vector<Vec2> drift_;
  std::vector<double> flicker_;
  std::vector<double> defocus_;
  // Work buffers, reused frame to frame.
  std::vector<float> phase_, absorb_, sharp_, focus_, wide_, tmp_, rowI_, rowZ_;
};

// Separable Gaussian blur with clamped borders (sigma in px); iterated box
// filters stand in for wide kernels.
void gaussianBlur(const std::vector<float>& src, std::vector<float>& dst, std::vector<float>& tmp,
                  int w, int h, double sigma);

}  // namespace budledger::demo
