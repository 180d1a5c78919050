#include "core/traps/lattice.h"

#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cmath>

#include "core/register/features.h"

namespace budledger::traps {

cv::Point2d Lattice::indices(cv::Point2d p) const {
  const cv::Point2d d = p - origin;
  const double det = a.x * b.y - a.y * b.x;
  return {(d.x * b.y - d.y * b.x) / det, (a.x * d.y - a.y * d.x) / det};
}

double Lattice::minPitch() const { return std::min(cv::norm(a), cv::norm(b)); }

namespace {

// Autocorrelation surface (wrapped, origin at (0,0)) with the window's own
// autocorrelation divided out so peaks far from the origin are not penalised.
class Autocorrelation {
 public:
  Autocorrelation(const std::vector<cv::Mat>& frames, int analysisSize) {
    const cv::Size full = frames.front().size();
    scale_ = std::max(1.0, std::max(full.width, full.height) / static_cast<double>(analysisSize));
    const cv::Size small(static_cast<int>(full.width / scale_),
                         static_cast<int>(full.height / scale_));
    // Lags up to 40% of the size are read: padding by that much keeps the
    // correlation linear (no wrap-around) at those lags.
    padded_ = cv::Size(cv::getOptimalDFTSize(small.width * 7 / 5 + 2),
                       cv::getOptimalDFTSize(small.height * 7 / 5 + 2));
    cv::Mat window;
    cv::createHanningWindow(window, small, CV_32F);
    cv::Mat power(padded_, CV_32FC2, cv::Scalar::all(0));
    cv::Mat buf(padded_, CV_32F), spec, reduced, features;
    for (const auto& f : frames) {
      cv::resize(f, reduced, small, 0, 0, cv::INTER_AREA);
      registration::structureFeatures(reduced, features, {1.0, 4.0});
      features -= cv::mean(features)[0];
      buf.setTo(0);
      cv::multiply(features, window, buf(cv::Rect(cv::Point(), small)));
      cv::dft(buf, spec, cv::DFT_COMPLEX_OUTPUT);
      cv::mulSpectrums(spec, spec, spec, 0, true);
      power += spec;
    }
    cv::dft(power, surface_, cv::DFT_INVERSE | cv::DFT_REAL_OUTPUT | cv::DFT_SCALE);
    // The window's autocorrelation: how much overlap each lag has.
    buf.setTo(0);
    window.copyTo(buf(cv::Rect(cv::Point(), small)));
    cv::dft(buf, spec, cv::DFT_COMPLEX_OUTPUT);
    cv::mulSpectrums(spec, spec, spec, 0, true);
    cv::Mat overlap;
    cv::dft(spec, overlap, cv::DFT_INVERSE | cv::DFT_REAL_OUTPUT | cv::DFT_SCALE);
    const float o0 = overlap.at<float>(0, 0), s0 = surface_.at<float>(0, 0);
    for (int y = 0; y < padded_.height; ++y)
      for (int x = 0; x < padded_.width; ++x) {
        const float o = overlap.at<float>(y, x) / o0;
        surface_.at<float>(y, x) = o > 0.2f ? surface_.at<float>(y, x) / (s0 * o) : 0.0f;
      }
    small_ = small;
  }

  double scale() const { return scale_; }
  cv::Size small() const { return small_; }
  float at(int x, int y) const {
    x %= padded_.width;
    y %= padded_.height;
    if (x < 0) x += padded_.width;
    if (y < 0) y += padded_.height;
    return surface_.at<float>(y, x);
  }
  // Sub-pixel local maximum within `r` of p (small-image lag coordinates).
  cv::Point2d refine(cv::Point2d p, int r, float* value) const {
    const int px = static_cast<int>(std::lround(p.x)), py = static_cast<int>(std::lround(p.y));
    int bx = px, by = py;
    float best = -1e30f;
    for (int y = py - r; y <= py + r; ++y)
      for (int x = px - r; x <= px + r; ++x)
        if (at(x, y) > best) {
          best = at(x, y);
          bx = x;
          by = y;
        }
    auto vertex = [](double m, double c, double q) {
      const double den = m - 2 * c + q;
      return den < 0 ? std::clamp(0.5 * (m - q) / den, -0.5, 0.5) : 0.0;
    };
    if (value) *value = best;
    return {bx + vertex(at(bx - 1, by), best, at(bx + 1, by)),
            by + vertex(at(bx, by - 1), best, at(bx, by + 1))};
  }

 private:
  double scale_ = 1;
  cv::Size small_, padded_;
  cv::Mat surface_;
};

double cross(cv::Point2d u, cv::Point2d v) { return u.x * v.y - u.y * v.x; }

// Lagrange-Gauss reduction to a shortest basis, then the orientation of the
// invariant in lattice.h: rows run along the shortest roughly horizontal vector.
void normalise(cv::Point2d& a, cv::Point2d& b) {
  for (int it = 0; it < 32; ++it) {
    if (a.dot(a) > b.dot(b)) std::swap(a, b);
    const double k = std::round(a.dot(b) / a.dot(a));
    if (k == 0) break;
    b -= k * a;
  }
  const cv::Point2d options[4][2] = {{a, b}, {b, a}, {a + b, a}, {a - b, a}};
  int pick = -1;
  for (int i = 0; i < 4; ++i) {
    const cv::Point2d r = options[i][0];
    if (std::abs(r.x) <= std::abs(r.y)) continue;
    if (pick < 0 || r.dot(r) < options[pick][0].dot(options[pick][0])) pick = i;
  }
  if (pick < 0) pick = std::abs(a.x) >= std::abs(b.x) ? 0 : 1;
  cv::Point2d r = options[pick][0], t = options[pick][1];
  if (r.x < 0) r = -r;
  t -= std::round(t.dot(r) / r.dot(r)) * r;
  if (t.y < 0) t = -t;
  a = r;
  b = t;
}

// The reduced autocorrelation places the vectors to a fraction of a reduced
// pixel; folding a frame onto the lattice needs better. Matching the centre of
// the first full-resolution frame against itself one and two cells away
// measures n a + m b directly; a least-squares fit through the origin gives a
// and b.
void refineAtFullResolution(const std::vector<cv::Mat>& frames, Lattice& lat) {
  const cv::Size full = frames.front().size();
  const int side = std::min({128, full.width / 3, full.height / 3});
  if (side < 32) return;
  constexpr int kSearch = 3, kReach = 2;
  const cv::Rect centre((full.width - side) / 2, (full.height - side) / 2, side, side);
  // Features only where the matching looks.
  const double rx = kReach * (std::abs(lat.a.x) + std::abs(lat.b.x)) + kSearch + 4;
  const double ry = kReach * (std::abs(lat.a.y) + std::abs(lat.b.y)) + kSearch + 4;
  const cv::Rect region =
      cv::Rect(static_cast<int>(centre.x - rx), static_cast<int>(centre.y - ry),
               static_cast<int>(side + 2 * rx), static_cast<int>(side + 2 * ry)) &
      cv::Rect(cv::Point(), full);
  cv::Mat features;
  registration::structureFeatures(frames.front()(region), features, {1.5, 0.0});
  const cv::Rect local = centre - region.tl();
  const cv::Mat tpl = features(local);
  std::vector<cv::Point2d> pts{{0, 0}};
  std::vector<cv::Point> idx{{0, 0}};
  std::vector<double> w{1e3};
  auto vertex = [](double a, double c, double b) {
    const double den = a - 2 * c + b;
    return den < 0 ? std::clamp(0.5 * (a - b) / den, -0.5, 0.5) : 0.0;
  };
  for (int m = 0; m <= kReach; ++m)
    for (int n = -kReach; n <= kReach; ++n) {
      if (m == 0 && n <= 0) continue;  // half of the symmetric set
      const cv::Point2d v = n * lat.a + m * lat.b;
      const cv::Point at(static_cast<int>(std::lround(local.x + v.x)) - kSearch,
                         static_cast<int>(std::lround(local.y + v.y)) - kSearch);
      const cv::Rect area(at, cv::Size(side + 2 * kSearch, side + 2 * kSearch));
      if ((area & cv::Rect(cv::Point(), features.size())) != area) continue;
      cv::Mat score;
      cv::matchTemplate(features(area), tpl, score, cv::TM_CCOEFF_NORMED);
      double best = 0;
      cv::Point loc;
      cv::minMaxLoc(score, nullptr, &best, nullptr, &loc);
      if (best < 0.5 || loc.x == 0 || loc.y == 0 || loc.x + 1 == score.cols ||
          loc.y + 1 == score.rows)
        continue;
      const double dx =
          vertex(score.at<float>(loc.y, loc.x - 1), best, score.at<float>(loc.y, loc.x + 1));
      const double dy =
          vertex(score.at<float>(loc.y - 1, loc.x), best, score.at<float>(loc.y + 1, loc.x));
      pts.emplace_back(at.x + loc.x + dx - local.x, at.y + loc.y + dy - local.y);
      idx.emplace_back(n, m);
      w.push_back(best);
    }
  if (pts.size() < 4) return;
  const Lattice fit = fitLattice(pts, idx, w);
  // Accept only a refinement, never a different lattice.
  if (cv::norm(fit.a - lat.a) < 1.5 && cv::norm(fit.b - lat.b) < 1.5) {
    lat.a = fit.a;
    lat.b = fit.b;
  }
}

}  // namespace

std::optional<Lattice> findLattice(const std::vector<cv::Mat>& frames,
                                   const LatticeOptions& options) {
  if (frames.empty()) return std::nullopt;
  const Autocorrelation ac(frames, options.analysisSize);
  const double s = ac.scale();
  const cv::Size small = ac.small();
  const int maxLag = static_cast<int>(0.4 * std::min(small.width, small.height));
  const double minLag = std::max(3.0, options.minPitchPx / s);

  // Local maxima of the surface away from the central lobe.
  struct Candidate {
    cv::Point2d lag;
    float value;
    double score;
  };
  std::vector<Candidate> candidates;
  for (int y = -maxLag; y <= maxLag; ++y)
    for (int x = 0; x <= maxLag; ++x) {  // half plane: the surface is symmetric
      if (x == 0 && y <= 0) continue;
      if (std::hypot(x, y) < minLag || std::hypot(x, y) > maxLag) continue;
      const float v = ac.at(x, y);
      if (v < 0.08f) continue;
      bool isMax = true;
      for (int dy = -2; dy <= 2 && isMax; ++dy)
        for (int dx = -2; dx <= 2; ++dx)
          if ((dx || dy) && ac.at(x + dx, y + dy) > v) {
            isMax = false;
            break;
          }
      if (isMax) candidates.push_back({{double(x), double(y)}, v, 0});
    }
  if (candidates.size() < 2) return std::nullopt;
  // A lattice vector repeats: its double is a peak too. Offsets between the
  // posts of one trap (the motif) do not.
  // (A double beyond the reliable lags cannot be checked and is not held
  // against the candidate.)
  // Nor is half a lattice vector, which a trap of two mirrored halves
  // produces: its double is a peak, a clearly stronger one.
  for (auto& c : candidates) {
    const cv::Point2d two = 2 * c.lag;
    float v2 = c.value;
    if (std::abs(two.x) <= maxLag && std::abs(two.y) <= maxLag) ac.refine(two, 1, &v2);
    c.score = c.value < 0.8f * v2 ? 0.0 : std::min<double>(c.value, v2);
  }
  double best = 0;
  for (const auto& c : candidates) best = std::max(best, c.score);
  if (best < 0.1) return std::nullopt;
  std::vector<Candidate> strong;
  for (const auto& c : candidates)
    if (c.score >= options.strongFraction * best) strong.push_back(c);
  std::sort(strong.begin(), strong.end(), [](const Candidate& p, const Candidate& q) {
    return cv::norm(p.lag) < cv::norm(q.lag);
  });
  if (strong.empty()) return std::nullopt;
  cv::Point2d a = strong.front().lag, b;
  bool haveB = false;
  for (size_t i = 1; i < strong.size(); ++i) {
    const cv::Point2d v = strong[i].lag;
    if (std::abs(cross(a, v)) > 0.3 * cv::norm(a) * cv::norm(v)) {
      b = v;
      haveB = true;
      break;
    }
  }
  if (!haveB) return std::nullopt;
  normalise(a, b);

  // Refine with every peak n a + m b in reach, by least squares.
  std::vector<cv::Point2d> pts;
  std::vector<cv::Point> idx;
  std::vector<double> w;
  double sumBasis = 0;
  int nBasis = 0;
  for (int m = -3; m <= 3; ++m)
    for (int n = -3; n <= 3; ++n) {
      if (!n && !m) continue;
      const cv::Point2d p = n * a + m * b;
      if (std::abs(p.x) > maxLag || std::abs(p.y) > maxLag) continue;
      float v = 0;
      const cv::Point2d q = ac.refine(p, 1, &v);
      if (std::abs(n) + std::abs(m) == 1) {
        sumBasis += v;
        ++nBasis;
      }
      if (v < 0.5 * best) continue;
      pts.push_back(q);
      idx.emplace_back(n, m);
      w.push_back(v);
    }
  Lattice lat;
  lat.a = a;
  lat.b = b;
  if (pts.size() >= 4) {
    // Lags have no origin: fit through zero.
    pts.emplace_back(0, 0);
    idx.emplace_back(0, 0);
    w.push_back(10.0 * best);
    const Lattice fit = fitLattice(pts, idx, w);
    lat.a = fit.a;
    lat.b = fit.b;
  }
  lat.a *= s;
  lat.b *= s;
  lat.quality = nBasis ? sumBasis / nBasis : 0;
  refineAtFullResolution(frames, lat);
  const cv::Size full = frames.front().size();
  if (lat.minPitch() < options.minPitchPx) return std::nullopt;
  // At least two traps along each direction must fit in the frame.
  if (std::abs(cross(lat.a, lat.b)) * 4 > static_cast<double>(full.area())) return std::nullopt;
  return lat;
}

Lattice fitLattice(const std::vector<cv::Point2d>& points, const std::vector<cv::Point>& indices,
                   const std::vector<double>& weights) {
  // p = o + i a + j b: for x and y separately, unknowns (o, a, b).
  cv::Matx33d ata = cv::Matx33d::zeros();
  cv::Vec3d atx(0, 0, 0), aty(0, 0, 0);
  for (size_t k = 0; k < points.size(); ++k) {
    const cv::Vec3d r(1.0, indices[k].x, indices[k].y);
    const double wt = weights.empty() ? 1.0 : weights[k];
    ata += wt * r * r.t();
    atx += wt * points[k].x * r;
    aty += wt * points[k].y * r;
  }
  cv::Vec3d sx, sy;
  cv::solve(ata, atx, sx, cv::DECOMP_SVD);
  cv::solve(ata, aty, sy, cv::DECOMP_SVD);
  Lattice l;
  l.origin = {sx[0], sy[0]};
  l.a = {sx[1], sy[1]};
  l.b = {sx[2], sy[2]};
  return l;
}

}  // namespace budledger::traps
