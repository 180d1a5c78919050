#include "core/traps/trap_finder.h"

#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cmath>
#include <numeric>

namespace budledger::traps {
namespace {

struct Part {
  cv::Point2d centroid;
  int area = 0;
  int label = 0;
  bool border = false;
  int cls = -1;
};

float medianOf(std::vector<float>& v) {
  if (v.empty()) return 0;
  auto mid = v.begin() + static_cast<long>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

// Is d (nearly) a non-zero lattice vector?
bool latticeVector(const Lattice& lat, cv::Point2d d, double tol) {
  Lattice l = lat;
  l.origin = {0, 0};
  const cv::Point2d ij = l.indices(d);
  const double i = std::round(ij.x), j = std::round(ij.y);
  if (i == 0 && j == 0) return false;
  return cv::norm(d - (i * lat.a + j * lat.b)) < tol;
}

// The sites (i, j) whose lattice point lies within the rectangle grown by `pad`.
std::vector<cv::Point> sitesIn(const Lattice& lat, cv::Size size, double pad) {
  const cv::Point2d corners[4] = {{-pad, -pad},
                                  {size.width + pad, -pad},
                                  {-pad, size.height + pad},
                                  {size.width + pad, size.height + pad}};
  double i0 = 1e9, i1 = -1e9, j0 = 1e9, j1 = -1e9;
  for (const auto& c : corners) {
    const cv::Point2d ij = lat.indices(c);
    i0 = std::min(i0, ij.x);
    i1 = std::max(i1, ij.x);
    j0 = std::min(j0, ij.y);
    j1 = std::max(j1, ij.y);
  }
  std::vector<cv::Point> out;
  for (int j = static_cast<int>(std::floor(j0)); j <= static_cast<int>(std::ceil(j1)); ++j)
    for (int i = static_cast<int>(std::floor(i0)); i <= static_cast<int>(std::ceil(i1)); ++i) {
      const cv::Point2d p = lat.at(i, j);
      if (p.x >= -pad && p.y >= -pad && p.x < size.width + pad && p.y < size.height + pad)
        out.emplace_back(i, j);
    }
  return out;
}

}  // namespace

TrapFinding findTraps(const cv::Mat& projectionIn, const Lattice& lattice,
                      const TrapFinderOptions& options) {
  TrapFinding result;
  cv::Mat P;
  projectionIn.convertTo(P, CV_32F);
  const cv::Size size = P.size();

  // 1. Lattice average over a box two cells wide.
  const double cellW = std::abs(lattice.a.x) + std::abs(lattice.b.x);
  const double cellH = std::abs(lattice.a.y) + std::abs(lattice.b.y);
  int boxW = static_cast<int>(std::ceil(2 * cellW)) | 1;
  int boxH = static_cast<int>(std::ceil(2 * cellH)) | 1;
  std::vector<cv::Point2d> boxSites;
  for (double grow : {2.0, 1.6, 1.3}) {
    boxW = static_cast<int>(std::ceil(grow * cellW)) | 1;
    boxH = static_cast<int>(std::ceil(grow * cellH)) | 1;
    boxSites.clear();
    for (const auto& ij : sitesIn(lattice, size, 0)) {
      const cv::Point2d p = lattice.at(ij.x, ij.y);
      if (p.x - boxW / 2 >= 0 && p.y - boxH / 2 >= 0 && p.x + boxW / 2 + 1 < size.width &&
          p.y + boxH / 2 + 1 < size.height)
        boxSites.push_back(p);
    }
    if (boxSites.size() >= 6) break;
  }
  if (boxSites.size() < 3) {
    result.note = "too few whole lattice cells in the frame to learn the trap's shape";
    return result;
  }
  // A few dozen sites make a clean median; more only cost time.
  if (boxSites.size() > 48) {
    std::vector<cv::Point2d> spread;
    for (size_t k = 0; k < 48; ++k) spread.push_back(boxSites[k * boxSites.size() / 48]);
    boxSites = std::move(spread);
  }
  const size_t nSites = boxSites.size();
  std::vector<cv::Mat> patches(nSites);
  for (size_t k = 0; k < nSites; ++k)
    cv::getRectSubPix(P, cv::Size(boxW, boxH), cv::Point2f(boxSites[k]), patches[k], CV_32F);
  cv::Mat T(boxH, boxW, CV_32F), spread(boxH, boxW, CV_32F);
  std::vector<float> v(nSites);
  for (int y = 0; y < boxH; ++y)
    for (int x = 0; x < boxW; ++x) {
      for (size_t k = 0; k < nSites; ++k) v[k] = patches[k].at<float>(y, x);
      const float m = medianOf(v);
      for (size_t k = 0; k < nSites; ++k) v[k] = std::abs(patches[k].at<float>(y, x) - m);
      T.at<float>(y, x) = m;
      // Not the median deviation: posts are in every trap, cells are not, so
      // a pixel where even one site in ten disagrees is not the chip's.
      const auto q = v.begin() + static_cast<long>(0.9 * static_cast<double>(nSites - 1));
      std::nth_element(v.begin(), q, v.end());
      spread.at<float>(y, x) = *q;
    }

  // 2. Structure: far from the medium's level, and alike in every trap.
  std::vector<float> all(T.begin<float>(), T.end<float>());
  const float bg = medianOf(all);
  cv::Mat D = cv::abs(T - bg);
  cv::GaussianBlur(D, D, cv::Size(), 1.0);
  double dmax = 0;
  cv::minMaxLoc(D, nullptr, &dmax);
  if (dmax <= 0) {
    result.note = "the lattice average is flat";
    return result;
  }
  cv::Mat D8, S;
  D.convertTo(D8, CV_8U, 255.0 / dmax);
  cv::threshold(D8, S, 0, 255, cv::THRESH_BINARY | cv::THRESH_OTSU);
  cv::Mat consistent = spread < 0.6 * D;
  S &= consistent;
  cv::morphologyEx(S, S, cv::MORPH_OPEN,
                   cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(3, 3)));
  // A post shows as a dark rim, a bright core and a halo: close the small
  // seams between them (far narrower than any gap between posts) and fill
  // small enclosed holes, so that each post is one part.
  cv::morphologyEx(S, S, cv::MORPH_CLOSE,
                   cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(5, 5)));
  {
    cv::Mat holes = ~S, holeLabels, holeStats, holeCentroids;
    const int nh = cv::connectedComponentsWithStats(holes, holeLabels, holeStats, holeCentroids, 4);
    const double small = 0.02 * std::abs(lattice.a.x * lattice.b.y - lattice.a.y * lattice.b.x);
    for (int l = 1; l < nh; ++l) {
      const int x = holeStats.at<int>(l, cv::CC_STAT_LEFT),
                y = holeStats.at<int>(l, cv::CC_STAT_TOP);
      const bool touches = x == 0 || y == 0 ||
                           x + holeStats.at<int>(l, cv::CC_STAT_WIDTH) >= boxW ||
                           y + holeStats.at<int>(l, cv::CC_STAT_HEIGHT) >= boxH;
      if (!touches && holeStats.at<int>(l, cv::CC_STAT_AREA) < small) S.setTo(255, holeLabels == l);
    }
  }

  cv::Mat labels, stats, centroids;
  const int n = cv::connectedComponentsWithStats(S, labels, stats, centroids, 8, CV_32S);
  std::vector<Part> parts;
  int largest = 0;
  for (int l = 1; l < n; ++l) largest = std::max(largest, stats.at<int>(l, cv::CC_STAT_AREA));
  for (int l = 1; l < n; ++l) {
    const int area = stats.at<int>(l, cv::CC_STAT_AREA);
    if (area < std::max(12, largest / 50)) continue;
    Part p;
    p.label = l;
    p.area = area;
    p.centroid = {centroids.at<double>(l, 0), centroids.at<double>(l, 1)};
    const int x = stats.at<int>(l, cv::CC_STAT_LEFT), y = stats.at<int>(l, cv::CC_STAT_TOP);
    p.border = x == 0 || y == 0 || x + stats.at<int>(l, cv::CC_STAT_WIDTH) >= boxW ||
               y + stats.at<int>(l, cv::CC_STAT_HEIGHT) >= boxH;
    parts.push_back(p);
  }
  // Parts repeating by a lattice vector belong to one class.
  const double tol = std::max(2.0, 0.08 * lattice.minPitch());
  int classes = 0;
  for (size_t i = 0; i < parts.size(); ++i) {
    if (parts[i].cls >= 0) continue;
    parts[i].cls = classes;
    for (size_t j = i + 1; j < parts.size(); ++j) {
      const double ratio = static_cast<double>(parts[j].area) / parts[i].area;
      if (parts[j].cls < 0 && ratio > 0.6 && ratio < 1.6 &&
          latticeVector(lattice, parts[j].centroid - parts[i].centroid, tol))
        parts[j].cls = classes;
    }
    ++classes;
  }
  const cv::Point2d boxCentre((boxW - 1) / 2.0, (boxH - 1) / 2.0);
  // The seed: of the class with the largest parts, the member nearest the
  // box's centre, so that its trap's other parts (within half a cell) lie
  // whole inside the box, which reaches a cell beyond it.
  // Only a class that repeats in the box is part of the motif; a one-off
  // (two posts fused by a cell in one trap, debris) is not.
  std::vector<int> largestOfClass(static_cast<size_t>(classes), 0),
      members(static_cast<size_t>(classes), 0);
  for (const auto& p : parts) {
    largestOfClass[static_cast<size_t>(p.cls)] =
        std::max(largestOfClass[static_cast<size_t>(p.cls)], p.area);
    ++members[static_cast<size_t>(p.cls)];
  }
  const bool anyRepeat = std::any_of(members.begin(), members.end(), [](int m) { return m >= 2; });
  int seed = -1;
  for (size_t i = 0; i < parts.size(); ++i) {
    if (parts[i].border || (anyRepeat && members[static_cast<size_t>(parts[i].cls)] < 2)) continue;
    if (seed < 0) {
      seed = static_cast<int>(i);
      continue;
    }
    const Part& s = parts[static_cast<size_t>(seed)];
    const int mine = largestOfClass[static_cast<size_t>(parts[i].cls)];
    const int theirs = largestOfClass[static_cast<size_t>(s.cls)];
    if (mine > 1.1 * theirs || (mine >= theirs / 1.1 && cv::norm(parts[i].centroid - boxCentre) <
                                                            cv::norm(s.centroid - boxCentre)))
      seed = static_cast<int>(i);
  }
  if (seed < 0) {
    result.note = "no trap structure stands out in the lattice average";
    return result;
  }
  // 3. One part of each class, as close together as possible: one trap.
  // Closeness is the gap between the parts' pixels, not between their
  // centres: the two halves of a cup face each other across the narrow
  // outlet, while neighbouring cups stand back to back farther apart even
  // when their centres are as close.
  std::vector<int> group{seed};
  cv::Mat groupMask = labels == parts[static_cast<size_t>(seed)].label;
  std::vector<bool> classTaken(static_cast<size_t>(classes), false);
  classTaken[static_cast<size_t>(parts[static_cast<size_t>(seed)].cls)] = true;
  // Grow the trap part by part, nearest gap first, one part per class (a
  // second part of a class would belong to a neighbouring trap).
  for (;;) {
    cv::Mat toGroup;  // distance of every pixel to the group's pixels
    cv::distanceTransform(~groupMask, toGroup, cv::DIST_L2, cv::DIST_MASK_PRECISE);
    int best = -1;
    double bestGap = 1e18;
    for (size_t i = 0; i < parts.size(); ++i) {
      if (parts[i].border || classTaken[static_cast<size_t>(parts[i].cls)] ||
          (anyRepeat && members[static_cast<size_t>(parts[i].cls)] < 2))
        continue;
      double gap = 0;
      cv::minMaxLoc(toGroup, &gap, nullptr, nullptr, nullptr, labels == parts[i].label);
      if (gap < bestGap) {
        bestGap = gap;
        best = static_cast<int>(i);
      }
    }
    if (best < 0 || bestGap > 0.5 * lattice.minPitch()) break;
    // A trap fits in its cell: rows are |b.y| apart, traps in a row |a.x|.
    const cv::Rect grown =
        cv::boundingRect(groupMask | (labels == parts[static_cast<size_t>(best)].label));
    if (grown.width >= std::abs(lattice.a.x) || grown.height >= std::abs(lattice.b.y)) {
      classTaken[static_cast<size_t>(parts[static_cast<size_t>(best)].cls)] = true;  // not this one
      continue;
    }
    group.push_back(best);
    classTaken[static_cast<size_t>(parts[static_cast<size_t>(best)].cls)] = true;
    groupMask |= labels == parts[static_cast<size_t>(best)].label;
  }
  cv::Mat M(boxH, boxW, CV_8U, cv::Scalar(0));
  for (int g : group) M.setTo(255, labels == parts[static_cast<size_t>(g)].label);
  std::vector<cv::Point> pts, hull;
  cv::findNonZero(M, pts);
  cv::convexHull(pts, hull);
  cv::Mat H(boxH, boxW, CV_8U, cv::Scalar(0));
  cv::fillConvexPoly(H, hull, cv::Scalar(255));
  cv::Mat grownM;
  cv::dilate(M, grownM, cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(3, 3)));
  cv::Mat freeSpace = H & ~grownM;
  cv::Mat dist;
  cv::distanceTransform(freeSpace, dist, cv::DIST_L2, cv::DIST_MASK_PRECISE);
  double dmaxFree = 0;
  cv::minMaxLoc(dist, nullptr, &dmaxFree);
  // The cup centre: the centroid of the free space deep inside the trap
  // (where a disc at least 60% as large as the largest that fits can sit).
  // A centroid over that region, unlike the single deepest point, stays put
  // when the cup is a channel whose deepest points form a ridge.
  cv::Point2d cup;
  if (dmaxFree >= 2.0) {
    const cv::Moments mo = cv::moments(dist >= 0.6 * dmaxFree, true);
    cup = {mo.m10 / mo.m00, mo.m01 / mo.m00};
  } else {
    const cv::Moments mo = cv::moments(M, true);
    cup = {mo.m10 / mo.m00, mo.m01 / mo.m00};
  }
  const cv::Rect hullBox = cv::boundingRect(hull);
  TrapLayout& layout = result.layout;
  layout.support = cv::Rect2d(hullBox.x - cup.x, hullBox.y - cup.y, hullBox.width, hullBox.height);

  // 4. Match every site against the template and refit the lattice.
  const int margin = 3;
  const cv::Rect tplBox(static_cast<int>(std::floor(hullBox.x - margin)),
                        static_cast<int>(std::floor(hullBox.y - margin)),
                        hullBox.width + 2 * margin, hullBox.height + 2 * margin);
  cv::Mat tpl;
  cv::getRectSubPix(T, tplBox.size(),
                    cv::Point2f(static_cast<float>(tplBox.x + (tplBox.width - 1) / 2.0),
                                static_cast<float>(tplBox.y + (tplBox.height - 1) / 2.0)),
                    tpl, CV_32F);
  cv::Scalar tplMean, tplSd;
  cv::meanStdDev(tpl, tplMean, tplSd);
  const double tplContrast = tplSd[0];
  // Template centre relative to the cup centre.
  const cv::Point2d tplOffset(tplBox.x + (tplBox.width - 1) / 2.0 - cup.x,
                              tplBox.y + (tplBox.height - 1) / 2.0 - cup.y);
  Lattice traps = lattice;
  traps.origin = lattice.origin + (cup - boxCentre);
  const int s = options.searchPx;
  struct Site {
    cv::Point ij;
    cv::Point2d predicted, matched;
    double score = 0;
    bool whole = false;
  };
  std::vector<Site> sites;
  const cv::Rect frame(cv::Point(0, 0), size);
  for (const auto& ij : sitesIn(traps, size, 0)) {
    Site site;
    site.ij = ij;
    site.predicted = traps.at(ij.x, ij.y);
    const cv::Point2d c = site.predicted;
    if (c.x < 0 || c.y < 0 || c.x >= size.width || c.y >= size.height) continue;
    const cv::Rect2d sup(c.x + layout.support.x, c.y + layout.support.y, layout.support.width,
                         layout.support.height);
    const cv::Rect2d seen = sup & cv::Rect2d(0, 0, size.width, size.height);
    const double visible = seen.area() / sup.area();
    if (visible < options.minVisible) continue;
    const cv::Point2d tc = c + tplOffset;
    site.whole = tc.x - tpl.cols / 2.0 - s >= 0 && tc.y - tpl.rows / 2.0 - s >= 0 &&
                 tc.x + tpl.cols / 2.0 + s + 1 < size.width &&
                 tc.y + tpl.rows / 2.0 + s + 1 < size.height;
    if (site.whole) {
      cv::Mat area, score;
      cv::getRectSubPix(P, cv::Size(tpl.cols + 2 * s, tpl.rows + 2 * s), cv::Point2f(tc), area,
                        CV_32F);
      cv::matchTemplate(area, tpl, score, cv::TM_CCOEFF_NORMED);
      double best = 0;
      cv::Point at;
      cv::minMaxLoc(score, nullptr, &best, nullptr, &at);
      // A featureless site (a wall, an empty part of the chip) can correlate
      // "perfectly" by rounding; it must show the template's contrast.
      cv::Scalar mean, sd;
      cv::meanStdDev(area(cv::Rect(at, tpl.size())), mean, sd);
      if (sd[0] < 0.3 * tplContrast) best = 0;
      auto vertex = [](double m, double c0, double p) {
        const double den = m - 2 * c0 + p;
        return den < 0 ? std::clamp(0.5 * (m - p) / den, -0.5, 0.5) : 0.0;
      };
      double ox = at.x - s, oy = at.y - s;
      if (at.x > 0 && at.x + 1 < score.cols)
        ox += vertex(score.at<float>(at.y, at.x - 1), best, score.at<float>(at.y, at.x + 1));
      if (at.y > 0 && at.y + 1 < score.rows)
        oy += vertex(score.at<float>(at.y - 1, at.x), best, score.at<float>(at.y + 1, at.x));
      site.matched = c + cv::Point2d(ox, oy);
      site.score = best;
    } else {
      // A cut trap: compare the visible part only, in place.
      const cv::Rect region =
          cv::Rect(static_cast<int>(std::lround(tc.x)) - tpl.cols / 2,
                   static_cast<int>(std::lround(tc.y)) - tpl.rows / 2, tpl.cols, tpl.rows);
      const cv::Rect inside = region & frame;
      if (inside.width < 4 || inside.height < 4) continue;
      const cv::Mat a = P(inside);
      const cv::Mat b =
          tpl(cv::Rect(inside.x - region.x, inside.y - region.y, inside.width, inside.height));
      cv::Mat score;
      cv::matchTemplate(a, b, score, cv::TM_CCOEFF_NORMED);
      site.score = score.at<float>(0, 0);
      cv::Scalar mean, sd, tmean, tsd;
      cv::meanStdDev(a, mean, sd);
      cv::meanStdDev(b, tmean, tsd);
      if (sd[0] < 0.3 * tsd[0]) site.score = 0;
      site.matched = c;
    }
    sites.push_back(site);
  }
  std::vector<float> wholeScores;
  for (const auto& st : sites)
    if (st.whole) wholeScores.push_back(static_cast<float>(st.score));
  if (wholeScores.empty()) {
    result.note = "no whole trap in the frame to match against";
    return result;
  }
  const double typical = medianOf(wholeScores);
  const double threshold = std::max(options.minMatch, options.presenceFraction * typical);
  std::vector<bool> use(sites.size());
  for (size_t k = 0; k < sites.size(); ++k) use[k] = sites[k].whole && sites[k].score >= threshold;
  Lattice fitted = traps;
  for (int round = 0; round < 3; ++round) {
    std::vector<cv::Point2d> pts2;
    std::vector<cv::Point> idx;
    std::vector<double> w;
    for (size_t k = 0; k < sites.size(); ++k)
      if (use[k]) {
        pts2.push_back(sites[k].matched);
        idx.push_back(sites[k].ij);
        w.push_back(sites[k].score);
      }
    if (pts2.size() < 3) break;
    fitted = fitLattice(pts2, idx, w);
    double sum = 0;
    int count = 0;
    for (size_t k = 0; k < sites.size(); ++k) {
      if (!use[k]) continue;
      const double r = cv::norm(sites[k].matched - fitted.at(sites[k].ij.x, sites[k].ij.y));
      if (r > 1.5) use[k] = false;
      sum += r * r;
      ++count;
    }
    result.fitResidualPx = count ? std::sqrt(sum / count) : 0;
  }
  fitted.quality = lattice.quality;
  for (const auto& st : sites) {
    if (st.score < threshold) {
      ++result.sitesRejected;
      continue;
    }
    Trap t;
    t.centre = fitted.at(st.ij.x, st.ij.y);
    if (t.centre.x < 0 || t.centre.y < 0 || t.centre.x >= size.width || t.centre.y >= size.height)
      continue;
    t.match = st.score;
    layout.traps.push_back(t);
  }
  layout.lattice = fitted;
  numberTraps(layout.traps, layout.lattice);
  layout.crop = cropBox(layout.support, layout.lattice);
  // The template image over the crop box, for thumbnails and measurement.
  cv::getRectSubPix(
      T, layout.crop.size(),
      cv::Point2f(static_cast<float>(cup.x + layout.crop.x + (layout.crop.width - 1) / 2.0),
                  static_cast<float>(cup.y + layout.crop.y + (layout.crop.height - 1) / 2.0)),
      layout.templ, CV_32F);
  if (layout.traps.empty()) result.note = "no lattice site matched the trap template";
  return result;
}

}  // namespace budledger::traps
