#include "core/measure/segment.h"

#include "core/measure/small_morphology.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numbers>
#include <numeric>
#include <opencv2/imgproc.hpp>
#include <queue>
#include <vector>

namespace budledger::measure {
namespace {

// Strong pixels a component needs to count: one noise excursion lights up only a few.
constexpr int kMinStrong = 8;

cv::Mat smoothedDifference(const cv::Mat& crop, const cv::Mat& background, double sigma) {
  cv::Mat diff;
  cv::subtract(crop, background, diff, cv::noArray(), CV_32F);
  if (sigma > 0) cv::GaussianBlur(diff, diff, cv::Size(0, 0), sigma, sigma, cv::BORDER_REPLICATE);
  return diff;
}

// Fills holes: background pixels not reachable from the image border through
// background (4-connected), by a flood from the border.
void fillHoles(cv::Mat& mask) {
  if (!mask.isContinuous()) mask = mask.clone();
  const int W = mask.cols, H = mask.rows;
  if (W < 3 || H < 3) return;
  thread_local std::vector<uchar> reached;
  thread_local std::vector<int> stack;
  reached.assign(static_cast<std::size_t>(W) * static_cast<std::size_t>(H), 0);
  stack.clear();
  uchar* m = mask.data;
  uchar* r = reached.data();
  auto seed = [&](int i) {
    if (!m[i] && !r[i]) {
      r[i] = 1;
      stack.push_back(i);
    }
  };
  for (int x = 0; x < W; ++x) {
    seed(x);
    seed((H - 1) * W + x);
  }
  for (int y = 1; y < H - 1; ++y) {
    seed(y * W);
    seed(y * W + W - 1);
  }
  while (!stack.empty()) {
    const int i = stack.back();
    stack.pop_back();
    const int x = i % W;
    if (x > 0) seed(i - 1);
    if (x < W - 1) seed(i + 1);
    if (i >= W) seed(i - W);
    if (i < (H - 1) * W) seed(i + W);
  }
  const int n = W * H;
  for (int i = 0; i < n; ++i)
    if (!r[i]) m[i] = 255;
}

// Pixels of the outline sign: strong ones (> threshold SDs) and the weaker ones
// (> half of it) connected to them, as in hysteresis edge linking (Canny 1986), so a
// thin outline weakened by a neighbouring halo still closes. Each object is then cut
// at half its own contrast (half its 90th percentile; sizes then do not grow with
// contrast over noise) and its holes are filled, unless the cut breaks a thin rim so
// that it no longer encloses the cell; an object that still covers little of its
// box (a rim with a gap) is closed with a wider disk. Objects are handled one by one
// in their own boxes, which keeps the work proportional to what is in the crop.
// Width of the blurred fringe outside a cell that the cut at half contrast trims (px):
// about twice the blur of the smoothing (sigma 1 px) and of the optics.
constexpr float kFringePx = 3.0f;
// How far a neighbour's halo and edge reach into the mother's pixels (px).
constexpr float kNeighbourReachPx = 3.0f;

cv::Mat outlineMask(const cv::Mat& diff, double sd, int polarity, double threshold) {
  const float strongLevel = static_cast<float>(threshold * sd);
  const float weakLevel = static_cast<float>(0.5 * threshold * sd);
  cv::Mat value(diff.size(), CV_32F), weak(diff.size(), CV_8U);
  bool anyStrong = false;
  for (int y = 0; y < diff.rows; ++y) {
    const float* d = diff.ptr<float>(y);
    float* v = value.ptr<float>(y);
    uchar* w = weak.ptr<uchar>(y);
    for (int x = 0; x < diff.cols; ++x) {
      v[x] = polarity == 0 ? std::abs(d[x]) : static_cast<float>(polarity) * d[x];
      w[x] = v[x] > weakLevel ? 255 : 0;
      anyStrong = anyStrong || v[x] > strongLevel;
    }
  }
  cv::Mat out(diff.size(), CV_8U, cv::Scalar(0));
  if (!anyStrong) return out;
  cv::Mat labels, stats, centroids;
  const int n = cv::connectedComponentsWithStats(weak, labels, stats, centroids, 8, CV_32S);
  std::vector<int> strongCount(static_cast<std::size_t>(n), 0);
  std::vector<float> peak(static_cast<std::size_t>(n), 0.f);
  for (int y = 0; y < diff.rows; ++y) {
    const int* l = labels.ptr<int>(y);
    const float* v = value.ptr<float>(y);
    for (int x = 0; x < diff.cols; ++x) {
      if (!l[x]) continue;
      const auto i = static_cast<std::size_t>(l[x]);
      if (v[x] > strongLevel) ++strongCount[i];
      peak[i] = std::max(peak[i], v[x]);
    }
  }
  static const StructuringElement disk3(cv::getStructuringElement(cv::MORPH_ELLIPSE, {3, 3}));
  static const StructuringElement disk7(cv::getStructuringElement(cv::MORPH_ELLIPSE, {7, 7}));
  thread_local cv::Mat scratch;
  const cv::Rect frame(0, 0, diff.cols, diff.rows);
  std::vector<int> histogram(32);
  for (int i = 1; i < n; ++i) {
    const auto ui = static_cast<std::size_t>(i);
    if (strongCount[ui] < kMinStrong) continue;
    const cv::Rect tight(stats.at<int>(i, cv::CC_STAT_LEFT), stats.at<int>(i, cv::CC_STAT_TOP),
                         stats.at<int>(i, cv::CC_STAT_WIDTH), stats.at<int>(i, cv::CC_STAT_HEIGHT));
    const cv::Rect box = (tight - cv::Point(4, 4) + cv::Size(8, 8)) & frame;
    // 90th percentile of the object's signal from a histogram between weak and peak.
    std::fill(histogram.begin(), histogram.end(), 0);
    const float span = std::max(1e-9f, peak[ui] - weakLevel);
    int count = 0;
    for (int y = tight.y; y < tight.y + tight.height; ++y) {
      const int* l = labels.ptr<int>(y);
      const float* v = value.ptr<float>(y);
      for (int x = tight.x; x < tight.x + tight.width; ++x)
        if (l[x] == i) {
          ++histogram[std::min(31, static_cast<int>(31.999f * (v[x] - weakLevel) / span))];
          ++count;
        }
    }
    int below = 0, bin = 0;
    while (bin < 31 && below + histogram[static_cast<std::size_t>(bin)] < 0.9 * count)
      below += histogram[static_cast<std::size_t>(bin++)];
    const float p90 = weakLevel + span * (static_cast<float>(bin) + 0.5f) / 32.f;
    const float level = std::max(weakLevel, 0.5f * p90);
    cv::Mat full(box.size(), CV_8U, cv::Scalar(0)), half(box.size(), CV_8U, cv::Scalar(0));
    for (int y = 0; y < box.height; ++y) {
      const int* l = labels.ptr<int>(y + box.y) + box.x;
      const float* v = value.ptr<float>(y + box.y) + box.x;
      uchar* f = full.ptr<uchar>(y);
      uchar* h = half.ptr<uchar>(y);
      for (int x = 0; x < box.width; ++x)
        if (l[x] == i) {
          f[x] = 255;
          h[x] = v[x] > level ? 255 : 0;
        }
    }
    smallClose(full, disk3, scratch);
    fillHoles(full);
    // The cut is for the blurred fringe along the outside. Deep inside the object a
    // weak interior (a bright rim's pale centre) stays: cut there, it can open onto
    // the neck of a bud and no longer be a hole to fill, and the ring left over is
    // split into sectors by the watershed.
    cv::Mat depth;
    cv::distanceTransform(full, depth, cv::DIST_L2, cv::DIST_MASK_3);
    half |= depth > kFringePx;
    smallClose(half, disk3, scratch);
    fillHoles(half);
    cv::Mat& object = 2 * cv::countNonZero(half) >= cv::countNonZero(full) ? half : full;
    const int area = cv::countNonZero(object);
    if (box.area() >= 30 && area < 0.45 * tight.area()) {
      smallClose(object, disk7, scratch);
      fillHoles(object);
    }
    smallOpen(object, disk3, scratch);
    cv::Mat target = out(box);
    target |= object;
  }
  return out;
}

struct Peak {
  cv::Point p;
  float height;
};

int findRoot(std::vector<int>& parent, int i) {
  while (parent[static_cast<std::size_t>(i)] != i) {
    parent[static_cast<std::size_t>(i)] =
        parent[static_cast<std::size_t>(parent[static_cast<std::size_t>(i)])];
    i = parent[static_cast<std::size_t>(i)];
  }
  return i;
}

// Lowest distance-transform value on the straight line between two peaks.
float ridgeBetween(const cv::Mat& dist, cv::Point a, cv::Point b) {
  cv::LineIterator it(dist, a, b, 8);
  float low = std::numeric_limits<float>::max();
  for (int i = 0; i < it.count; ++i, ++it) low = std::min(low, dist.at<float>(it.pos()));
  return low;
}

// Marker-controlled watershed on the relief -dist (Beucher & Meyer 1993): seeds grow
// in order of decreasing distance to the background, so two cells meet at their neck.
// (cv::watershed floods on colour differences, not on a given relief.) A bucket queue
// over the distance quantised to quarter pixels keeps it linear in the pixels flooded.
// Components holding a single seed are labelled whole, without flooding.
void floodFromSeeds(const cv::Mat& dist, const cv::Mat& mask, const cv::Mat& components,
                    int componentCount, cv::Mat& labels) {
  const int W = labels.cols, H = labels.rows;
  std::vector<int> seedLabel(static_cast<std::size_t>(componentCount), 0);
  std::vector<bool> multi(static_cast<std::size_t>(componentCount), false);
  for (int y = 0; y < H; ++y)
    for (int x = 0; x < W; ++x)
      if (const int l = labels.at<int>(y, x)) {
        const auto c = static_cast<std::size_t>(components.at<int>(y, x));
        if (seedLabel[c] && seedLabel[c] != l) multi[c] = true;
        seedLabel[c] = l;
      }
  bool anyMulti = false;
  for (int y = 0; y < H; ++y)
    for (int x = 0; x < W; ++x) {
      const auto c = static_cast<std::size_t>(components.at<int>(y, x));
      if (!c) continue;
      if (multi[c])
        anyMulti = true;
      else
        labels.at<int>(y, x) = seedLabel[c];
    }
  if (!anyMulti) return;
  constexpr float kQuantum = 4.0f;
  double maxDist = 0;
  cv::minMaxLoc(dist, nullptr, &maxDist);
  const int levels = static_cast<int>(maxDist * kQuantum) + 2;
  std::vector<std::vector<int>> buckets(static_cast<std::size_t>(levels));
  auto bucketOf = [&](int index) {
    return levels - 1 - static_cast<int>(dist.at<float>(index / W, index % W) * kQuantum);
  };
  auto pushNeighbours = [&](int x, int y) {
    for (int dy = -1; dy <= 1; ++dy)
      for (int dx = -1; dx <= 1; ++dx) {
        const int nx = x + dx, ny = y + dy;
        if ((dx || dy) && nx >= 0 && ny >= 0 && nx < W && ny < H && mask.at<uchar>(ny, nx) &&
            !labels.at<int>(ny, nx) &&
            multi[static_cast<std::size_t>(components.at<int>(ny, nx))]) {
          const int idx = ny * W + nx;
          buckets[static_cast<std::size_t>(std::max(0, bucketOf(idx)))].push_back(idx);
        }
      }
  };
  for (int y = 0; y < H; ++y)
    for (int x = 0; x < W; ++x)
      if (labels.at<int>(y, x) && multi[static_cast<std::size_t>(components.at<int>(y, x))])
        pushNeighbours(x, y);
  for (int b = 0; b < levels; ++b) {
    auto& bucket = buckets[static_cast<std::size_t>(b)];
    for (std::size_t i = 0; i < bucket.size(); ++i) {
      const int idx = bucket[i];
      const int x = idx % W, y = idx / W;
      if (labels.at<int>(y, x)) continue;
      // Take the label of the labelled neighbour with the greatest distance (uphill).
      int label = 0;
      float best = -1;
      for (int dy = -1; dy <= 1; ++dy)
        for (int dx = -1; dx <= 1; ++dx) {
          const int nx = x + dx, ny = y + dy;
          if (nx < 0 || ny < 0 || nx >= W || ny >= H) continue;
          const int l = labels.at<int>(ny, nx);
          if (l && dist.at<float>(ny, nx) > best) {
            best = dist.at<float>(ny, nx);
            label = l;
          }
        }
      if (!label) continue;
      labels.at<int>(y, x) = label;
      pushNeighbours(x, y);  // neighbours at lower levels land in later buckets
    }
  }
}

// Labels the mask's cells (1..n) in `labels` (CV_32S), splitting touching ones.
int splitCells(const cv::Mat& mask, const SegmentParams& params, cv::Mat& labels, cv::Mat& dist) {
  cv::distanceTransform(mask, dist, cv::DIST_L2, 3);
  // Peaks: maxima of the distance map in a 5x5 window; a plateau of equal maxima is
  // one peak (its first pixel).
  cv::Mat dilated;
  static const StructuringElement square5(cv::getStructuringElement(cv::MORPH_RECT, {5, 5}));
  smallDilate(dist, dilated, square5);
  const float minPeak = 1.5f;
  cv::Mat peakMask(dist.size(), CV_8U, cv::Scalar(0));
  for (int y = 0; y < dist.rows; ++y) {
    const float* d = dist.ptr<float>(y);
    const float* m = dilated.ptr<float>(y);
    uchar* pm = peakMask.ptr<uchar>(y);
    for (int x = 0; x < dist.cols; ++x)
      if (d[x] >= minPeak && d[x] >= m[x]) pm[x] = 255;
  }
  cv::Mat plateau;
  const int nPlateaus = cv::connectedComponents(peakMask, plateau, 8, CV_32S);
  std::vector<Peak> peaks;
  std::vector<bool> taken(static_cast<std::size_t>(nPlateaus), false);
  for (int y = 0; y < dist.rows; ++y) {
    const int* p = plateau.ptr<int>(y);
    for (int x = 0; x < dist.cols; ++x)
      if (p[x] && !taken[static_cast<std::size_t>(p[x])]) {
        taken[static_cast<std::size_t>(p[x])] = true;
        peaks.push_back({{x, y}, dist.at<float>(y, x)});
      }
  }
  // Highest first, so a plateau's pixels join the first of them.
  std::sort(peaks.begin(), peaks.end(),
            [](const Peak& a, const Peak& b) { return a.height > b.height; });
  std::vector<int> parent(peaks.size());
  std::iota(parent.begin(), parent.end(), 0);
  for (std::size_t i = 0; i < peaks.size(); ++i)
    for (std::size_t j = 0; j < i; ++j) {
      const int ri = findRoot(parent, static_cast<int>(i));
      const int rj = findRoot(parent, static_cast<int>(j));
      if (ri == rj) continue;
      const float low = std::min(peaks[i].height, peaks[j].height);
      const double sep = std::hypot(peaks[i].p.x - peaks[j].p.x, peaks[i].p.y - peaks[j].p.y);
      // Inside one another's inscribed circle, or no neck on the way: one cell.
      if (sep <= std::max(peaks[i].height, peaks[j].height) ||
          ridgeBetween(dist, peaks[i].p, peaks[j].p) >= params.neckRatio * low)
        parent[static_cast<std::size_t>(ri)] = rj;
    }
  std::vector<int> groupOf(peaks.size(), 0);
  int groups = 0;
  std::vector<int> rootLabel(peaks.size(), 0);
  for (std::size_t i = 0; i < peaks.size(); ++i) {
    const int r = findRoot(parent, static_cast<int>(i));
    if (!rootLabel[static_cast<std::size_t>(r)]) rootLabel[static_cast<std::size_t>(r)] = ++groups;
    groupOf[i] = rootLabel[static_cast<std::size_t>(r)];
  }
  // Seeds: each peak group; components too thin for any peak get one seed each.
  labels = cv::Mat(mask.size(), CV_32S, cv::Scalar(0));
  for (std::size_t i = 0; i < peaks.size(); ++i) labels.at<int>(peaks[i].p) = groupOf[i];
  cv::Mat comp;
  const int nComp = cv::connectedComponents(mask, comp, 8, CV_32S);
  std::vector<bool> seeded(static_cast<std::size_t>(nComp), false);
  for (const auto& pk : peaks) seeded[static_cast<std::size_t>(comp.at<int>(pk.p))] = true;
  int n = groups;
  for (int y = 0; y < comp.rows; ++y)
    for (int x = 0; x < comp.cols; ++x) {
      const int c = comp.at<int>(y, x);
      if (c > 0 && !seeded[static_cast<std::size_t>(c)]) {
        seeded[static_cast<std::size_t>(c)] = true;
        labels.at<int>(y, x) = ++n;
      }
    }
  floodFromSeeds(dist, mask, comp, nComp, labels);
  return n;
}

struct Moments {
  double n = 0, sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0;
  double sd = 0, sad = 0, sdd = 0;
  bool edge = false;

  void add(int x, int y, double v, bool onEdge) {
    n += 1;
    sx += x;
    sy += y;
    sxx += static_cast<double>(x) * x;
    syy += static_cast<double>(y) * y;
    sxy += static_cast<double>(x) * y;
    sd += v;
    sad += std::abs(v);
    sdd += v * v;
    edge = edge || onEdge;
  }

  Cell toCell(const CropGeometry& g) const {
    Cell c;
    c.areaPx = n;
    c.x = sx / n;
    c.y = sy / n;
    const double cxx = sxx / n - c.x * c.x, cyy = syy / n - c.y * c.y, cxy = sxy / n - c.x * c.y;
    const double tr = cxx + cyy, det = cxx * cyy - cxy * cxy;
    const double disc = std::sqrt(std::max(0.0, tr * tr / 4 - det));
    const double l1 = tr / 2 + disc, l2 = std::max(0.0, tr / 2 - disc);
    c.eccentricity = l1 > 0 ? std::sqrt(std::max(0.0, 1 - l2 / l1)) : 0;
    c.areaUm2 = n * g.pixelUm * g.pixelUm;
    c.diameterUm = 2 * std::sqrt(c.areaUm2 / std::numbers::pi);
    c.cupDxUm = (c.x - g.cupX) * g.pixelUm;
    c.cupDyUm = (c.y - g.cupY) * g.pixelUm;
    c.contrast = sd / n;
    c.strength = sad / n;
    c.texture = std::sqrt(std::max(0.0, sdd / n - c.contrast * c.contrast));
    c.cutByEdge = edge;
    return c;
  }
};

// A bud still joined to the mother without a neck the watershed can cut: the part of
// her region beyond her inscribed circle (plus a margin for a slightly oval mother).
// When it is large enough it becomes the bud and the mother keeps the rest.
void splitProtrusion(cv::Mat& motherMask, const cv::Mat& dist, const cv::Mat& diff, double sd,
                     const CropGeometry& g, const SegmentParams& params, CropReading& out) {
  // Her inscribed circle: the deepest point of the foreground's distance map inside her
  // (a bud joined at a neck does not reach that deep).
  double radius = 0;
  cv::Point centre;
  cv::minMaxLoc(dist, nullptr, &radius, nullptr, &centre, motherMask);
  if (radius < 2) return;
  const double margin = std::max(1.5, 0.15 * radius);
  const double reach = radius + margin;
  cv::Mat beyond(motherMask.size(), CV_8U, cv::Scalar(0));
  for (int y = 0; y < motherMask.rows; ++y) {
    const uchar* m = motherMask.ptr<uchar>(y);
    uchar* b = beyond.ptr<uchar>(y);
    for (int x = 0; x < motherMask.cols; ++x)
      if (m[x] && std::hypot(x - centre.x, y - centre.y) > reach) b[x] = 255;
  }
  cv::Mat comp, stats, centroids;
  const int n = cv::connectedComponentsWithStats(beyond, comp, stats, centroids, 8, CV_32S);
  int best = 0;
  for (int i = 1; i < n; ++i)
    if (!best || stats.at<int>(i, cv::CC_STAT_AREA) > stats.at<int>(best, cv::CC_STAT_AREA))
      best = i;
  const double expectedArea = std::numbers::pi * params.motherRadiusPx * params.motherRadiusPx;
  if (!best || stats.at<int>(best, cv::CC_STAT_AREA) < params.minBudAreaFraction * expectedArea)
    return;
  Moments mother, bud;
  for (int y = 0; y < motherMask.rows; ++y) {
    uchar* m = motherMask.ptr<uchar>(y);
    const int* l = comp.ptr<int>(y);
    const float* d = diff.ptr<float>(y);
    for (int x = 0; x < motherMask.cols; ++x) {
      if (!m[x]) continue;
      const bool onEdge = x == 0 || y == 0 || x == motherMask.cols - 1 || y == motherMask.rows - 1;
      if (l[x] == best) {
        bud.add(x, y, d[x] / sd, onEdge);
        m[x] = 0;
      } else {
        mother.add(x, y, d[x] / sd, onEdge);
      }
    }
  }
  Cell& m = out.cells[static_cast<std::size_t>(out.mother)];
  const bool touches = m.touchesMother;
  m = mother.toCell(g);
  m.role = CellRole::Mother;
  m.touchesMother = touches;
  Cell b = bud.toCell(g);
  b.touchesMother = true;
  out.cells.push_back(b);
}

// Cell index + 1 per pixel (0: background or a speck too small to be a cell); the
// mother's pixels outside her final mask belong to the protrusion bud.
cv::Mat cellIndexImage(const cv::Mat& labels, const std::vector<int>& cellOfLabel, int mother,
                       const cv::Mat& motherMask, int protrusion) {
  cv::Mat out(labels.size(), CV_16U, cv::Scalar(0));
  for (int y = 0; y < labels.rows; ++y) {
    const int* l = labels.ptr<int>(y);
    auto* o = out.ptr<std::uint16_t>(y);
    for (int x = 0; x < labels.cols; ++x) {
      if (!l[x]) continue;
      int idx = cellOfLabel[static_cast<std::size_t>(l[x])];
      if (idx < 0) continue;
      if (idx == mother && !motherMask.at<uchar>(y, x)) idx = protrusion;
      if (idx >= 0) o[x] = static_cast<std::uint16_t>(idx + 1);
    }
  }
  return out;
}

// Bounding box (grown by `margin`) of the strong outline-sign pixels that have at least
// two strong 4-neighbours (a lone noise excursion rarely has); empty when none.
cv::Rect foregroundBox(const cv::Mat& diff, double sd, const SegmentParams& params, int margin) {
  const float strongLevel = static_cast<float>(params.threshold * sd);
  const int W = diff.cols, H = diff.rows;
  auto strong = [&](int x, int y) {
    const float d = diff.at<float>(y, x);
    return (params.polarity == 0 ? std::abs(d) : static_cast<float>(params.polarity) * d) >
           strongLevel;
  };
  int x0 = W, y0 = H, x1 = -1, y1 = -1;
  for (int y = 1; y < H - 1; ++y)
    for (int x = 1; x < W - 1; ++x) {
      if (!strong(x, y)) continue;
      const int neighbours =
          strong(x - 1, y) + strong(x + 1, y) + strong(x, y - 1) + strong(x, y + 1);
      if (neighbours < 2) continue;
      x0 = std::min(x0, x);
      y0 = std::min(y0, y);
      x1 = std::max(x1, x);
      y1 = std::max(y1, y);
    }
  if (x1 < 0) return {};
  const cv::Rect box(x0 - margin, y0 - margin, x1 - x0 + 1 + 2 * margin, y1 - y0 + 1 + 2 * margin);
  return box & cv::Rect(0, 0, W, H);
}

}  // namespace

OutlineAreas outlineAreas(const cv::Mat& crop, const cv::Mat& background, double noiseSd,
                          const SegmentParams& params) {
  const cv::Mat diff = smoothedDifference(crop, background, params.smoothSigmaPx);
  const double sd = std::max(noiseSd, 1e-6);
  const cv::Mat dark = outlineMask(diff, sd, -1, params.threshold);
  const cv::Mat bright = outlineMask(diff, sd, +1, params.threshold);
  OutlineAreas a;
  a.dark = cv::countNonZero(dark);
  a.bright = cv::countNonZero(bright);
  a.both = cv::countNonZero(dark & bright);
  return a;
}

int choosePolarity(const OutlineAreas& a) {
  const double large = std::max(a.dark, a.bright);
  if (large <= 0) return 0;
  const double small = std::min(a.dark, a.bright);
  // One sign finds little, or the two do not nest (noise specks): the larger carries the cells.
  if (small < 0.1 * large || a.both < 0.5 * small) return a.dark > a.bright ? -1 : +1;
  // The sign whose filled outline lies inside the other's is the cell; the other is a halo.
  const double darkInside = a.both / a.dark, brightInside = a.both / a.bright;
  return darkInside >= brightInside ? -1 : +1;
}

double estimateNoise(const cv::Mat& crop, const cv::Mat& background, double smoothSigmaPx) {
  const cv::Mat d = smoothedDifference(crop, background, smoothSigmaPx);
  std::vector<float> v(d.begin<float>(), d.end<float>());
  if (v.empty()) return 1.0;
  auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  const float med = *mid;
  for (auto& x : v) x = std::abs(x - med);
  std::nth_element(v.begin(), mid, v.end());
  return std::max(1e-6, 1.4826 * static_cast<double>(*mid));
}

namespace {

// Everything after the difference image, on a region of it (`geometry` in its
// coordinates).
CropReading segmentRegion(const cv::Mat& diff, double sd, const CropGeometry& geometry,
                          const SegmentParams& params) {
  CropReading out;
  cv::Mat mask = outlineMask(diff, sd, params.polarity, params.threshold);
  out.foregroundPx = cv::countNonZero(mask);
  if (out.foregroundPx == 0) {
    if (params.keepMask) out.mask = cv::Mat(mask.size(), CV_16U, cv::Scalar(0));
    return out;
  }

  cv::Mat labels, dist;
  const int n = splitCells(mask, params, labels, dist);
  std::vector<Moments> mom(static_cast<std::size_t>(n + 1));
  for (int y = 0; y < labels.rows; ++y) {
    const int* l = labels.ptr<int>(y);
    const float* d = diff.ptr<float>(y);
    for (int x = 0; x < labels.cols; ++x)
      if (l[x])
        mom[static_cast<std::size_t>(l[x])].add(
            x, y, d[x] / sd, x == 0 || y == 0 || x == labels.cols - 1 || y == labels.rows - 1);
  }
  const double expectedArea = std::numbers::pi * params.motherRadiusPx * params.motherRadiusPx;
  const double minArea = params.minCellAreaFraction * expectedArea;
  std::vector<int> cellOfLabel(static_cast<std::size_t>(n + 1), -1);
  for (int l = 1; l <= n; ++l) {
    const Moments& m = mom[static_cast<std::size_t>(l)];
    if (m.n < minArea) continue;
    cellOfLabel[static_cast<std::size_t>(l)] = static_cast<int>(out.cells.size());
    out.cells.push_back(m.toCell(geometry));
  }

  // The mother: the cell nearest the cup among those seated in it.
  const double seat = params.seatRadiusFactor * params.motherRadiusPx;
  double best = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < out.cells.size(); ++i) {
    const Cell& c = out.cells[i];
    const double d = std::hypot(c.x - geometry.cupX, c.y - geometry.cupY);
    if (d <= seat && c.areaPx >= params.minMotherAreaFraction * expectedArea && d < best) {
      best = d;
      out.mother = static_cast<int>(i);
    }
  }
  if (out.mother < 0) {
    if (params.keepMask) out.mask = cellIndexImage(labels, cellOfLabel, -1, cv::Mat(), -1);
    return out;
  }
  out.cells[static_cast<std::size_t>(out.mother)].role = CellRole::Mother;

  int motherLabel = 0;
  for (int l = 1; l <= n; ++l)
    if (cellOfLabel[static_cast<std::size_t>(l)] == out.mother) motherLabel = l;
  cv::Mat motherMask = labels == motherLabel;
  const std::size_t cellsBefore = out.cells.size();
  splitProtrusion(motherMask, dist, diff, sd, geometry, params, out);
  if (params.keepMask) {
    const int protrusion = out.cells.size() > cellsBefore ? static_cast<int>(cellsBefore) : -1;
    out.mask = cellIndexImage(labels, cellOfLabel, out.mother, motherMask, protrusion);
  }

  // Cells touching the mother: their labels meet hers within a 2-pixel ring. The
  // distance to her outline also gives every cell its true gap to her.
  cv::Mat notMother = motherMask == 0, toMother;
  cv::distanceTransform(notMother, toMother, cv::DIST_L2, cv::DIST_MASK_PRECISE);
  for (Cell& c : out.cells) c.gapToMotherPx = std::numeric_limits<double>::infinity();
  out.cells[static_cast<std::size_t>(out.mother)].gapToMotherPx = 0;
  for (std::size_t i = cellsBefore; i < out.cells.size(); ++i) out.cells[i].gapToMotherPx = 0;
  for (int y = 0; y < labels.rows; ++y) {
    const int* l = labels.ptr<int>(y);
    const float* d = toMother.ptr<float>(y);
    for (int x = 0; x < labels.cols; ++x)
      if (l[x] && l[x] != motherLabel) {
        const int ci = cellOfLabel[static_cast<std::size_t>(l[x])];
        if (ci < 0) continue;
        Cell& c = out.cells[static_cast<std::size_t>(ci)];
        c.gapToMotherPx = std::min(c.gapToMotherPx, std::max(0.0, d[x] - 1.0));
        if (d[x] <= 2.5) c.touchesMother = true;
      }
  }
  // Her contrast and texture (the death evidence) from her pixels away from other cells:
  // a neighbour pressed against her lends her its halo and edge, and a mother read with
  // a weaker contrast for as long as a passer-by stays beside her looked like a dying one.
  {
    cv::Mat others = (labels > 0) & (motherMask == 0), toOthers;
    cv::distanceTransform(others == 0, toOthers, cv::DIST_L2, cv::DIST_MASK_3);
    double n = 0, sum = 0, squares = 0;
    for (int y = 0; y < labels.rows; ++y) {
      const uchar* m = motherMask.ptr<uchar>(y);
      const float* d = diff.ptr<float>(y);
      const float* far = toOthers.ptr<float>(y);
      for (int x = 0; x < labels.cols; ++x)
        if (m[x] && far[x] > kNeighbourReachPx) {
          const double v = d[x] / sd;
          n += 1;
          sum += v;
          squares += v * v;
        }
    }
    Cell& mother = out.cells[static_cast<std::size_t>(out.mother)];
    if (n >= 0.3 * mother.areaPx) {
      mother.contrast = sum / n;
      mother.texture = std::sqrt(std::max(0.0, squares / n - mother.contrast * mother.contrast));
    }
  }
  const double motherArea = out.cells[static_cast<std::size_t>(out.mother)].areaPx;
  double bestBud = 0;
  for (std::size_t i = 0; i < out.cells.size(); ++i) {
    const Cell& c = out.cells[i];
    if (!c.touchesMother || static_cast<int>(i) == out.mother) continue;
    if (c.areaPx < motherArea && c.areaPx > bestBud) {
      bestBud = c.areaPx;
      out.bud = static_cast<int>(i);
    }
  }
  if (out.bud >= 0) out.cells[static_cast<std::size_t>(out.bud)].role = CellRole::Bud;
  return out;
}

}  // namespace

namespace {

cv::Mat gradientMagnitude(const cv::Mat& image, double sigma) {
  cv::Mat s, gx, gy, mag;
  cv::GaussianBlur(image, s, cv::Size(0, 0), std::max(0.5, sigma));
  cv::Sobel(s, gx, CV_32F, 1, 0, 3, 0.125);
  cv::Sobel(s, gy, CV_32F, 0, 1, 3, 0.125);
  cv::magnitude(gx, gy, mag);
  return mag;
}

}  // namespace

cv::Mat noiseMap(const cv::Mat& background, double noiseSd, double shiftPx, double smoothSigmaPx) {
  cv::Mat g = gradientMagnitude(background, smoothSigmaPx);
  cv::Mat var;
  cv::multiply(g, g, var, shiftPx * shiftPx);
  var += noiseSd * noiseSd;
  cv::Mat out;
  cv::sqrt(var, out);
  return out;
}

double estimateShift(const std::vector<const cv::Mat*>& crops,
                     const std::vector<const cv::Mat*>& backgrounds, double noiseSd,
                     double smoothSigmaPx) {
  double num = 0, den = 0;
  for (std::size_t i = 0; i < crops.size() && i < backgrounds.size(); ++i) {
    const cv::Mat d = smoothedDifference(*crops[i], *backgrounds[i], smoothSigmaPx);
    const cv::Mat g = gradientMagnitude(*backgrounds[i], smoothSigmaPx);
    for (int y = 0; y < d.rows; ++y) {
      const float* dr = d.ptr<float>(y);
      const float* gr = g.ptr<float>(y);
      for (int x = 0; x < d.cols; ++x) {
        const double g2 = static_cast<double>(gr[x]) * gr[x];
        num += (static_cast<double>(dr[x]) * dr[x] - noiseSd * noiseSd) * g2;
        den += g2 * g2;
      }
    }
  }
  return den > 0 ? std::clamp(std::sqrt(std::max(0.0, num / den)), 0.05, 1.5) : 0.3;
}

CropReading segmentCrop(const cv::Mat& crop, const cv::Mat& background, double noiseSd,
                        const CropGeometry& geometry, const SegmentParams& params,
                        const cv::Mat* noiseMapPtr) {
  CropReading out;
  double sd = std::max(noiseSd, 1e-6);
  cv::Mat diff = smoothedDifference(crop, background, params.smoothSigmaPx);
  if (noiseMapPtr && noiseMapPtr->size() == diff.size()) {
    // In units of the local SD from here on.
    cv::divide(diff, *noiseMapPtr, diff);
    sd = 1.0;
  }
  // Kept signed by the outline sign: a halo of the other sign reads as background.
  if (params.keepMask)
    out.difference = diff * ((params.polarity == 0 ? 1.0 : params.polarity) / sd);
  {
    // Segmentation-free presence: mean |difference| in the disk a mother would fill.
    const double r = std::max(1.0, params.motherRadiusPx);
    const int x0 = std::max(0, static_cast<int>(geometry.cupX - r)),
              x1 = std::min(diff.cols - 1, static_cast<int>(geometry.cupX + r));
    const int y0 = std::max(0, static_cast<int>(geometry.cupY - r)),
              y1 = std::min(diff.rows - 1, static_cast<int>(geometry.cupY + r));
    double sum = 0;
    int count = 0;
    for (int y = y0; y <= y1; ++y) {
      const float* d = diff.ptr<float>(y);
      for (int x = x0; x <= x1; ++x) {
        const double dx = x - geometry.cupX, dy = y - geometry.cupY;
        if (dx * dx + dy * dy > r * r) continue;
        sum += std::abs(d[x]);
        ++count;
      }
    }
    out.cupStrength = count ? sum / count / sd : 0;
  }
  // Work only where something stands out: the box around every component with enough
  // strong pixels, with a margin for the morphology (most of a crop is empty medium).
  const cv::Rect roi = foregroundBox(diff, sd, params, 6);
  if (roi.area() == 0) {
    if (params.keepMask) out.mask = cv::Mat(diff.size(), CV_16U, cv::Scalar(0));
    return out;
  }
  CropGeometry local = geometry;
  local.cupX -= roi.x;
  local.cupY -= roi.y;
  CropReading region = segmentRegion(diff(roi).clone(), sd, local, params);
  region.cupStrength = out.cupStrength;
  for (auto& cell : region.cells) {
    cell.x += roi.x;
    cell.y += roi.y;
  }
  if (params.keepMask) {
    cv::Mat full(diff.size(), CV_16U, cv::Scalar(0));
    if (!region.mask.empty()) region.mask.copyTo(full(roi));
    region.mask = full;
    region.difference = out.difference;
  }
  return region;
}

}  // namespace budledger::measure
