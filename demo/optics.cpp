#include "demo/optics.h"

#include <algorithm>
#include <cmath>

#include "demo/detmath.h"

namespace budledger::demo {
namespace {

// Optical path differences in µm: (n − n_medium) × thickness.
constexpr double kCellDeltaN = 0.05;   // cytoplasm ≈ 1.38 vs medium 1.33 (from memory)
constexpr double kPostDeltaN = 0.035;  // PDMS ≈ 1.41 against medium, scaled for the sloped walls
// The refractile cell wall (≈ 0.1–0.2 µm thick, dense polysaccharide) draws
// the dark ring that makes yeast stand out in brightfield; modelled as extra
// optical path in a thin shell under the surface.
constexpr double kWallPathUm = 0.22;
constexpr double kWallUm = 0.22;
// Response constants (per µm² and per µm of path), tuned by eye so that a focus
// contrast of 1 gives rims of roughly ±30% at 0.25 µm/px.
constexpr double kFocus = 1.6;
constexpr double kFocusSigmaUm = 0.45;
constexpr float kSharpShare = 0.6f;  // weight of the in-focus Laplacian beside the defocus one
constexpr double kEdge = 2.2;
constexpr double kHalo = 1.6;
constexpr double kHaloSigmaUm = 1.1;

void boxPassH(const float* src, float* dst, int w, int h, int r) {
  const double norm = 1.0 / (2 * r + 1);
  for (int y = 0; y < h; ++y) {
    const float* s = src + static_cast<std::size_t>(y) * w;
    float* d = dst + static_cast<std::size_t>(y) * w;
    double acc = 0.0;
    for (int i = -r; i <= r; ++i) acc += s[std::clamp(i, 0, w - 1)];
    for (int x = 0; x < w; ++x) {
      d[x] = static_cast<float>(acc * norm);
      acc += s[std::min(x + r + 1, w - 1)] - s[std::max(x - r, 0)];
    }
  }
}

void boxPassV(const float* src, float* dst, int w, int h, int r) {
  const float norm = 1.0f / static_cast<float>(2 * r + 1);
  std::vector<float> acc(static_cast<std::size_t>(w), 0.0f);
  for (int i = -r; i <= r; ++i) {
    const float* s = src + static_cast<std::size_t>(std::clamp(i, 0, h - 1)) * w;
    for (int x = 0; x < w; ++x) acc[static_cast<std::size_t>(x)] += s[x];
  }
  for (int y = 0; y < h; ++y) {
    float* d = dst + static_cast<std::size_t>(y) * w;
    const float* add = src + static_cast<std::size_t>(std::min(y + r + 1, h - 1)) * w;
    const float* sub = src + static_cast<std::size_t>(std::max(y - r, 0)) * w;
    for (int x = 0; x < w; ++x) {
      d[x] = acc[static_cast<std::size_t>(x)] * norm;
      acc[static_cast<std::size_t>(x)] += add[x] - sub[x];
    }
  }
}

}  // namespace

void gaussianBlur(const std::vector<float>& src, std::vector<float>& dst, std::vector<float>& tmp,
                  int w, int h, double sigma) {
  const std::size_t n = static_cast<std::size_t>(w) * static_cast<std::size_t>(h);
  dst.resize(n);
  tmp.resize(n);
  if (sigma < 0.3) {
    dst = src;
    return;
  }
  if (sigma > 3.0) {
    // Three box passes of radius r have variance 3·((2r+1)² − 1)/12 ≈ sigma².
    const int r = std::max(
        1, static_cast<int>(std::floor(0.5 * (std::sqrt(4.0 * sigma * sigma + 1.0) - 1.0) + 0.5)));
    boxPassH(src.data(), tmp.data(), w, h, r);
    boxPassH(tmp.data(), dst.data(), w, h, r);
    boxPassH(dst.data(), tmp.data(), w, h, r);
    boxPassV(tmp.data(), dst.data(), w, h, r);
    boxPassV(dst.data(), tmp.data(), w, h, r);
    boxPassV(tmp.data(), dst.data(), w, h, r);
    return;
  }
  const int r = static_cast<int>(std::ceil(3.0 * sigma));
  std::vector<float> k(static_cast<std::size_t>(2 * r + 1));
  double sum = 0.0;
  for (int i = -r; i <= r; ++i)
    sum += (k[static_cast<std::size_t>(i + r)] =
                static_cast<float>(detmath::exp(-0.5 * i * i / (sigma * sigma))));
  for (auto& v : k) v = static_cast<float>(v / sum);
  // Horizontal pass over a padded row.
  std::vector<float> row(static_cast<std::size_t>(w + 2 * r));
  for (int y = 0; y < h; ++y) {
    const float* s = src.data() + static_cast<std::size_t>(y) * w;
    for (int x = -r; x < w + r; ++x)
      row[static_cast<std::size_t>(x + r)] = s[std::clamp(x, 0, w - 1)];
    // Tap by tap across the row: the same order of additions per pixel as a
    // per-pixel loop, but the inner loop vectorises.
    float* d = tmp.data() + static_cast<std::size_t>(y) * w;
    std::fill(d, d + w, 0.0f);
    for (int i = 0; i <= 2 * r; ++i) {
      const float kv = k[static_cast<std::size_t>(i)];
      const float* src_i = row.data() + i;
      for (int x = 0; x < w; ++x) d[x] += kv * src_i[x];
    }
  }
  // Vertical pass, row by row so the inner loop runs along memory.
  for (int y = 0; y < h; ++y) {
    float* d = dst.data() + static_cast<std::size_t>(y) * w;
    std::fill(d, d + w, 0.0f);
    for (int i = -r; i <= r; ++i) {
      const float* s = tmp.data() + static_cast<std::size_t>(std::clamp(y + i, 0, h - 1)) * w;
      const float kv = k[static_cast<std::size_t>(i + r)];
      for (int x = 0; x < w; ++x) d[x] += kv * s[x];
    }
  }
}

Renderer::Renderer(const Device& device, const OpticsParams& optics, int frames, Rng rng)
    : device_(device), p_(optics), noiseRng_(rng.derive("noise")) {
  w_ = device.width();
  h_ = device.height();
  margin_ = 72;
  cw_ = w_ + 2 * margin_;
  ch_ = h_ + 2 * margin_;
  posts_.assign(static_cast<std::size_t>(cw_) * static_cast<std::size_t>(ch_), 0.0f);
  device.renderPosts(posts_, cw_, ch_, margin_);
  const float postPath = static_cast<float>(device.params().heightUm * kPostDeltaN * p_.postIndex);
  for (auto& v : posts_) v *= postPath;
  Rng chipRng = rng.derive("chip");
  addChipTexture(chipRng);

  Rng driftRng = rng.derive("drift");
  makeDrift(driftRng, frames);
  Rng illumRng = rng.derive("illumination");
  makeIllumination(illumRng);
  Rng lamp = rng.derive("lamp");
  flicker_.resize(static_cast<std::size_t>(frames));
  defocus_.resize(static_cast<std::size_t>(frames));
  for (int k = 0; k < frames; ++k) {
    double f = 1.0 + p_.flicker * lamp.normal();
    if (lamp.bernoulli(p_.flicker > 0 ? 0.01 : 0.0)) f *= 1.0 - 8.0 * p_.flicker;  // a brief dip
    flicker_[static_cast<std::size_t>(k)] = std::max(0.2, f);
    const bool off = k > 0 && lamp.bernoulli(p_.defocusRate);
    defocus_[static_cast<std::size_t>(k)] = off ? p_.defocus * lamp.uniform(0.6, 1.4) : 0.0;
  }
}

void Renderer::addChipTexture(Rng& rng) {
  if (p_.debris <= 0) return;
  // Surface roughness of the PDMS/glass: smooth noise of a few nm optical path.
  const std::size_t n = posts_.size();
  std::vector<float> noise(n), smooth, tmp;
  const NormalTable& z = normalTable();
  for (std::size_t i = 0; i < n; i += 4) {
    std::uint64_t bits = rng.next();
    for (std::size_t k = i; k < std::min(n, i + 4); ++k, bits >>= 16)
      noise[k] = z[static_cast<std::uint16_t>(bits & 0xffff)];
  }
  const double px = device_.params().pixelUm;
  gaussianBlur(noise, smooth, tmp, cw_, ch_, 0.5 / px);
  const float amp = static_cast<float>(0.004 * p_.debris * (0.5 / px));
  for (std::size_t i = 0; i < n; ++i) posts_[i] += amp * smooth[i];
  // Debris stuck to the chip: small refractile specks, static relative to the posts.
  const int specks = static_cast<int>(
      std::floor(8e-5 * p_.debris * static_cast<double>(n) * px * px / 0.0625 + 0.5));
  for (int i = 0; i < specks; ++i) {
    const double sx = rng.uniform(0.0, cw_), sy = rng.uniform(0.0, ch_);
    const double r = rng.uniform(0.2, 0.7) / px;
    const double path = rng.uniform(0.03, 0.12);
    const int x0 = std::max(0, static_cast<int>(sx - r - 1)),
              x1 = std::min(cw_ - 1, static_cast<int>(sx + r + 1));
    const int y0 = std::max(0, static_cast<int>(sy - r - 1)),
              y1 = std::min(ch_ - 1, static_cast<int>(sy + r + 1));
    for (int y = y0; y <= y1; ++y)
      for (int x = x0; x <= x1; ++x) {
        const double q = ((x - sx) * (x - sx) + (y - sy) * (y - sy)) / (r * r);
        if (q < 1.0)
          posts_[static_cast<std::size_t>(y) * cw_ + x] +=
              static_cast<float>(path * std::sqrt(1.0 - q));
      }
  }
}

void Renderer::makeDrift(Rng& rng, int frames) {
  drift_.assign(static_cast<std::size_t>(frames), Vec2{});
  Vec2 d{}, v{};
  const double limit = margin_ - 4.0;
  for (int k = 1; k < frames; ++k) {
    v = {p_.driftSmoothness * v.x + p_.drift * rng.normal(),
         p_.driftSmoothness * v.y + p_.drift * rng.normal()};
    // Slight pull back to the start: stages drift, then settle.
    d = {d.x + v.x - 0.01 * d.x, d.y + v.y - 0.01 * d.y};
    if (rng.bernoulli(p_.jumpRate)) {
      const double a = rng.uniform(0.0, 2.0 * detmath::kPi);
      const double len = p_.jumpPx * rng.uniform(0.5, 1.5);
      d = {d.x + len * detmath::cos(a), d.y + len * detmath::sin(a)};
    }
    d = {std::clamp(d.x, -limit, limit), std::clamp(d.y, -limit, limit)};
    drift_[static_cast<std::size_t>(k)] = d;
  }
}

void Renderer::makeIllumination(Rng& rng) {
  illum_.assign(static_cast<std::size_t>(w_) * static_cast<std::size_t>(h_), 1.0f);
  const double cx = w_ * rng.uniform(0.35, 0.65), cy = h_ * rng.uniform(0.35, 0.65);
  const double ga = rng.uniform(0.0, 2.0 * detmath::kPi);
  const double gx = detmath::cos(ga), gy = detmath::sin(ga);
  const double diag = std::sqrt(static_cast<double>(w_) * w_ + static_cast<double>(h_) * h_);
  for (int y = 0; y < h_; ++y)
    for (int x = 0; x < w_; ++x) {
      const double rx = (x - cx) / (0.5 * diag), ry = (y - cy) / (0.5 * diag);
      const double vignette = 1.0 - 0.8 * p_.illumination * (rx * rx + ry * ry);
      const double slope =
          1.0 + 0.5 * p_.illumination * ((x - 0.5 * w_) * gx + (y - 0.5 * h_) * gy) / diag;
      illum_[static_cast<std::size_t>(y) * w_ + x] = static_cast<float>(vignette * slope);
    }
  // Out-of-focus dust on the camera window: soft dark discs with a faint bright rim.
  const int specks = static_cast<int>(std::floor(6.0 * p_.dust + 0.5));
  for (int i = 0; i < specks; ++i) {
    const double sx = rng.uniform(0.0, w_), sy = rng.uniform(0.0, h_);
    const double rad = rng.uniform(6.0, 30.0);
    const double depth = rng.uniform(0.02, 0.08);
    const int x0 = std::max(0, static_cast<int>(sx - 2 * rad)),
              x1 = std::min(w_ - 1, static_cast<int>(sx + 2 * rad));
    const int y0 = std::max(0, static_cast<int>(sy - 2 * rad)),
              y1 = std::min(h_ - 1, static_cast<int>(sy + 2 * rad));
    for (int y = y0; y <= y1; ++y)
      for (int x = x0; x <= x1; ++x) {
        const double q = std::sqrt((x - sx) * (x - sx) + (y - sy) * (y - sy)) / rad;
        const double disc = q < 1.0 ? 1.0 : detmath::exp(-(q - 1.0) * (q - 1.0) * 30.0);
        const double rim = detmath::exp(-(q - 1.1) * (q - 1.1) * 60.0);
        illum_[static_cast<std::size_t>(y) * w_ + x] *=
            static_cast<float>(1.0 - depth * disc + 0.3 * depth * rim);
      }
  }
}

void Renderer::shiftPosts(Vec2 d) {
  // Bilinear resampling of the padded post canvas: frame pixel (x, y) shows chip
  // point (x − dx, y − dy).
  const double sx = margin_ - d.x, sy = margin_ - d.y;
  const int ix = static_cast<int>(std::floor(sx)), iy = static_cast<int>(std::floor(sy));
  const float fx = static_cast<float>(sx - ix), fy = static_cast<float>(sy - iy);
  const float w00 = (1 - fx) * (1 - fy), w10 = fx * (1 - fy), w01 = (1 - fx) * fy, w11 = fx * fy;
  for (int y = 0; y < h_; ++y) {
    const float* r0 = posts_.data() + static_cast<std::size_t>(y + iy) * cw_ + ix;
    const float* r1 = r0 + cw_;
    float* out = phase_.data() + static_cast<std::size_t>(y) * w_;
    for (int x = 0; x < w_; ++x)
      out[x] = w00 * r0[x] + w10 * r0[x + 1] + w01 * r1[x] + w11 * r1[x + 1];
  }
}

void Renderer::drawCell(const CellBody& c) {
  const double a = std::max(c.semiMajor, 0.5), b = std::max(c.semiMinor, 0.5);
  const int x0 = std::max(0, static_cast<int>(std::floor(c.centre.x - a - 1)));
  const int x1 = std::min(w_ - 1, static_cast<int>(std::ceil(c.centre.x + a + 1)));
  const int y0 = std::max(0, static_cast<int>(std::floor(c.centre.y - a - 1)));
  const int y1 = std::min(h_ - 1, static_cast<int>(std::ceil(c.centre.y + a + 1)));
  if (x0 > x1 || y0 > y1) return;
  const double path = c.thickness * kCellDeltaN * p_.cellIndex;
  const double wallPath = kWallPathUm * p_.cellIndex * std::min(1.0, c.thickness / 2.0);
  const double radiusUm = b * device_.params().pixelUm;

  // Texture: a vacuole off centre and a few granules, fixed to the cell (its seed)
  // and turning with it (spin).
  Rng tex(c.seed);
  const double cs = detmath::cos(c.spin), sn = detmath::sin(c.spin);
  auto rotate = [&](double u, double v) { return Vec2{u * cs - v * sn, u * sn + v * cs}; };
  const Vec2 vac = rotate(tex.uniform(-0.25, 0.25), tex.uniform(-0.25, 0.25));
  const double vacR = tex.uniform(0.4, 0.6);
  struct Granule {
    Vec2 at;
    double amp, r2;
  };
  Granule gr[12];
  const int ng = c.granules > 0 ? 12 : 0;
  for (int i = 0; i < ng; ++i) {
    const double rr = 0.75 * std::sqrt(tex.uniform());
    const double th = tex.uniform(0.0, 2.0 * detmath::kPi);
    gr[i].at = rotate(rr * detmath::cos(th), rr * detmath::sin(th));
    gr[i].amp = c.granules * tex.uniform(-1.0, 1.0);
    const double gs = tex.uniform(0.08, 0.16);
    gr[i].r2 = gs * gs;
  }

  for (int y = y0; y <= y1; ++y) {
    float* ph = phase_.data() + static_cast<std::size_t>(y) * w_;
    float* ab = absorb_.data() + static_cast<std::size_t>(y) * w_;
    for (int x = x0; x <= x1; ++x) {
      const double dx = x - c.centre.x, dy = y - c.centre.y;
      const double u = (dx * c.axis.x + dy * c.axis.y) / a;
      const double v = (-dx * c.axis.y + dy * c.axis.x) / b;
      const double q = u * u + v * v;
      if (q >= 1.0) continue;
      double shape = std::sqrt(1.0 - q);
      if (c.vacuole > 0) {
        const double qu = (u - vac.x) / vacR, qv = (v - vac.y) / vacR;
        const double qq = qu * qu + qv * qv;
        if (qq < 1.0) shape -= c.vacuole * std::sqrt(1.0 - qq) * shape;
      }
      for (int i = 0; i < ng; ++i) {
        const double gu = u - gr[i].at.x, gv = v - gr[i].at.y;
        const double d2 = gu * gu + gv * gv;
        if (d2 < 9.0 * gr[i].r2)
          shape += gr[i].amp * (1.0 - d2 / (9.0 * gr[i].r2)) * std::sqrt(1.0 - q);
      }
      // Depth under the surface in µm (exact on the minor axis, close elsewhere).
      const double depth = (1.0 - std::sqrt(q)) * radiusUm / kWallUm;
      // A Gaussian-like shell profile without a transcendental per pixel.
      const double t = std::max(0.0, 1.0 - depth * depth / 9.0);
      const double wall = wallPath * t * t * t * t * t * t * t * t * t;
      const float val = static_cast<float>(path * std::max(shape, 0.0) + wall);
      ph[x] = std::max(ph[x], val);
      if (c.absorb > 0) ab[x] = std::max(ab[x], static_cast<float>(c.absorb * std::sqrt(1.0 - q)));
    }
  }
}

void Renderer::render(int frame, const std::vector<CellBody>& cells,
                      std::vector<std::uint16_t>& out) {
  const std::size_t n = static_cast<std::size_t>(w_) * static_cast<std::size_t>(h_);
  phase_.resize(n);
  absorb_.assign(n, 0.0f);
  out.resize(n);
  shiftPosts(drift_[static_cast<std::size_t>(frame)]);
  for (const auto& c : cells) drawCell(c);

  const double px = device_.params().pixelUm;
  const double off = defocus_[static_cast<std::size_t>(frame)];
  const double sigma = p_.psfUm * (1.0 + 2.5 * off) / px;
  gaussianBlur(phase_, sharp_, tmp_, w_, h_, sigma);
  // The defocus term acts at the scale of the focus offset (about half a micron),
  // broader than the in-focus blur: it lights cell interiors as a whole, while the
  // sharp term keeps fine rim lines.
  gaussianBlur(sharp_, focus_, tmp_, w_, h_, kFocusSigmaUm * (1.0 + off) / px);
  gaussianBlur(phase_, wide_, tmp_, w_, h_, kHaloSigmaUm * (1.0 + off) / px);

  const double sign = p_.polarity == "bright-rim" ? -1.0 : 1.0;
  // Laplacian and squared gradient in µm units so the look does not depend on pixel size.
  const float kLap =
      static_cast<float>(sign * kFocus * p_.focusContrast * (1.0 + 1.5 * off) / (px * px));
  const float kGrad = static_cast<float>(kEdge * p_.edgeDarkening / (4.0 * px * px) / (1.0 + off));
  const float kWide = static_cast<float>(kHalo * p_.halo * (1.0 + off));
  const double flick = flicker_[static_cast<std::size_t>(frame)];
  const float e0 = static_cast<float>(p_.backgroundElectrons * flick);
  const float gain = static_cast<float>(p_.aduPerElectron);
  const float offset = static_cast<float>(p_.offsetAdu);
  const float read2 = static_cast<float>(p_.readNoiseElectrons * p_.readNoiseElectrons);
  const float noise = static_cast<float>(p_.noise);
  const NormalTable& z = normalTable();
  rowI_.resize(static_cast<std::size_t>(w_));
  rowZ_.assign(static_cast<std::size_t>(w_) + 4, 0.0f);
  for (int y = 0; y < h_; ++y) {
    const std::size_t row = static_cast<std::size_t>(y) * static_cast<std::size_t>(w_);
    const std::size_t rowUp = static_cast<std::size_t>(std::max(y - 1, 0)) * w_;
    const std::size_t rowDn = static_cast<std::size_t>(std::min(y + 1, h_ - 1)) * w_;
    const float *s = sharp_.data() + row, *up = sharp_.data() + rowUp, *dn = sharp_.data() + rowDn;
    const float *f = focus_.data() + row, *fu = focus_.data() + rowUp, *fd = focus_.data() + rowDn;
    const float* wd = wide_.data() + row;
    const float* ab = absorb_.data() + row;
    const float* il = illum_.data() + row;
    float* in = rowI_.data();
    // Intensity (relative to the empty channel) by the image-formation model; the
    // first and last columns use clamped neighbours.
    auto pixel = [&](int x, int xl, int xr) {
      const float lap = kSharpShare * (s[xl] + s[xr] + up[x] + dn[x] - 4.0f * s[x]) +
                        (f[xl] + f[xr] + fu[x] + fd[x] - 4.0f * f[x]);
      const float gx = s[xr] - s[xl], gy = dn[x] - up[x];
      const float i = 1.0f - kLap * lap - kGrad * (gx * gx + gy * gy) + kWide * (wd[x] - s[x]);
      return std::max(i, 0.0f) * (1.0f - ab[x]) * il[x];
    };
    in[0] = pixel(0, 0, std::min(1, w_ - 1));
    for (int x = 1; x < w_ - 1; ++x) in[x] = pixel(x, x - 1, x + 1);
    if (w_ > 1) in[w_ - 1] = pixel(w_ - 1, w_ - 2, w_ - 1);
    // Camera: Poisson–Gaussian noise (shot noise as a Gaussian of variance e, which
    // at hundreds of electrons per pixel is indistinguishable), then gain and offset.
    float* zr = rowZ_.data();
    if (noise > 0) {
      for (int x = 0; x < w_; x += 4) {
        std::uint64_t bits = noiseRng_.next();
        for (int k = 0; k < 4; ++k, bits >>= 16)
          zr[x + k] = z[static_cast<std::uint16_t>(bits & 0xffff)];
      }
    }
    std::uint16_t* o = out.data() + row;
    for (int x = 0; x < w_; ++x) {
      const float e = e0 * in[x];
      const float value = e + noise * std::sqrt(e + read2) * zr[x];
      const float adu = std::clamp(offset + gain * value, 0.0f, 65535.0f);
      o[x] = static_cast<std::uint16_t>(static_cast<int>(adu + 0.5f));
    }
  }
}

}  // namespace budledger::demo
