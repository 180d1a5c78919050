#include "core/measure/features.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numbers>

#include <opencv2/imgproc.hpp>

namespace budledger::measure {
namespace {

// How far (in mother radii) a former bud's centre must have moved away from the
// mother for her to count as let go while still in view.
constexpr double kMovedOff = 0.1;
// Followed frame to frame, a bud lets go when she moves out this far (mother radii)
// between readings without shrinking, once she has a daughter's size (over the
// mother's area; a daughter is ~0.6 of her, a bud's visible part less). A separated
// daughter is pushed off by about 0.5 µm, 0.2-0.3 radii; at 0.22 buds squeezed into
// the outlet, which grow outwards fast, were let go early (docs/validation.md).
constexpr double kLetGoMove = 0.3;
constexpr double kDaughterSize = 0.2;

double radiusOf(double areaPx) { return std::sqrt(std::max(0.0, areaPx) / std::numbers::pi); }

// Edge-to-edge gap between the mother and another cell: as measured between their
// outlines when the segmentation did (a bud squeezed into a gap is long and thin),
// else between disks of their areas.
double gapBetween(const Cell& mother, const Cell& c) {
  if (c.gapToMotherPx >= 0 && std::isfinite(c.gapToMotherPx)) return c.gapToMotherPx;
  return std::hypot(mother.x - c.x, mother.y - c.y) - radiusOf(mother.areaPx) - radiusOf(c.areaPx);
}

// The bud ratio from the cells attached to the mother (offset from her centre, area
// over hers). A mother carries one bud at a time (common practice). Pieces on one side
// of her (directions within 60 degrees) are one bud the watershed cut in two and add
// up. When they lie on different sides and the largest side holds a daughter's size,
// that is a daughter who has separated but still presses against her, and the bud is
// the smaller side: summing them hid the separation and the next bud behind one long
// budded stretch (most missed separations also missed the next bud,
// docs/validation.md).
struct Attached {
  double dx, dy, areaRatio;
};
double oneBudRatio(const std::vector<Attached>& cells) {
  std::vector<Attached> sides;
  double total = 0;
  for (const auto& c : cells) {
    total += c.areaRatio;
    const double n = std::max(1e-9, std::hypot(c.dx, c.dy));
    auto side = std::find_if(sides.begin(), sides.end(), [&](const Attached& s) {
      return (s.dx * c.dx + s.dy * c.dy) / (std::max(1e-9, std::hypot(s.dx, s.dy)) * n) > 0.5;
    });
    if (side == sides.end())
      sides.push_back(c);
    else
      side->areaRatio += c.areaRatio;
  }
  if (sides.size() < 2) return total;
  const auto [least, most] = std::minmax_element(
      sides.begin(), sides.end(),
      [](const Attached& a, const Attached& b) { return a.areaRatio < b.areaRatio; });
  return most->areaRatio >= kDaughterSize ? least->areaRatio : total;
}

}  // namespace

std::string_view featureName(int i) {
  static constexpr std::string_view names[kFeatureCount] = {
      "mother",         "mother_area",  "bud_ratio",       "attached_cells",    "neighbour_gap",
      "neighbour_area", "cup_strength", "foreground_area", "mother_elongation", "mother_offset"};
  return i >= 0 && i < kFeatureCount ? names[i] : "?";
}

std::vector<AttachedCell> attachedCells(const CropReading& r, const FeatureContext& ctx) {
  std::vector<AttachedCell> out;
  if (r.mother < 0) return out;
  const Cell& m = r.cells[static_cast<std::size_t>(r.mother)];
  const double rm = std::max(1.0, radiusOf(m.areaPx));
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    if (static_cast<int>(i) == r.mother) continue;
    const Cell& c = r.cells[i];
    if (gapBetween(m, c) / rm < ctx.attachGap && c.areaPx < m.areaPx)
      out.push_back({static_cast<int>(i), (c.x - m.x) / rm, (c.y - m.y) / rm, c.areaPx / m.areaPx});
  }
  return out;
}

std::vector<int> daughtersApart(const CropReading& r, const FeatureContext& ctx) {
  std::vector<int> out;
  if (r.mother < 0) return out;
  const Cell& m = r.cells[static_cast<std::size_t>(r.mother)];
  const double rm = std::max(1.0, radiusOf(m.areaPx));
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    const Cell& c = r.cells[i];
    if (static_cast<int>(i) != r.mother && gapBetween(m, c) / rm >= ctx.attachGap &&
        c.areaPx >= kDaughterSize * m.areaPx)
      out.push_back(static_cast<int>(i));
  }
  return out;
}

std::vector<std::vector<int>> lodgedNeighbours(const std::vector<CropReading>& readings,
                                               const FeatureContext& ctx, int minFrames) {
  struct Track {
    int first = 0, last = 0;
    double x = 0, y = 0;
    struct Member {
      int frame = 0;
      int cell = 0;
      double dist = 0;  // centre to the mother's centre, in her radii
    };
    std::vector<Member> members;
  };
  // A lodged daughter is not read the same in every frame, and neither way may restart
  // the count of how long she has stayed, or she would seldom stay long enough: she is
  // followed out to twice the attach gap (read a little apart from the mother), and a
  // track survives `kMissedFrames` frames without her (no reading: flicker, defocus).
  // Together these found 8 more of 1496 true tenures in one record and cut review
  // edits by 5% on the validation sets (docs/validation.md).
  constexpr int kMissedFrames = 2;
  FeatureContext near = ctx;
  near.attachGap = 2 * ctx.attachGap;
  std::vector<Track> tracks;
  std::vector<int> open;  // indexes of tracks seen within the last kMissedFrames + 1 frames
  for (int t = 0; t < static_cast<int>(readings.size()); ++t) {
    std::erase_if(open, [&](int k) {
      return tracks[static_cast<std::size_t>(k)].last < t - 1 - kMissedFrames;
    });
    for (const auto& a : attachedCells(readings[static_cast<std::size_t>(t)], near)) {
      int best = -1;
      double bestD = 0.5;  // link within half a mother radius
      for (int k : open) {
        const Track& tr = tracks[static_cast<std::size_t>(k)];
        const double d = std::hypot(tr.x - a.dx, tr.y - a.dy);
        if (d < bestD && tr.last < t) {
          bestD = d;
          best = k;
        }
      }
      if (best < 0) {
        best = static_cast<int>(tracks.size());
        tracks.push_back({});
        tracks.back().first = t;
        open.push_back(best);
      }
      Track& tr = tracks[static_cast<std::size_t>(best)];
      tr.last = t;
      tr.x = a.dx;
      tr.y = a.dy;
      tr.members.push_back({t, a.cell, std::hypot(a.dx, a.dy)});
    }
  }
  // Any stretch of `minFrames` in which the neighbour's area stays within a factor 1.4
  // is lodged, even if the same track began as a growing bud (a daughter that lodged).
  std::vector<std::vector<int>> out(readings.size());
  for (const auto& tr : tracks) {
    const auto& mem = tr.members;
    const std::size_t n = mem.size();
    auto areaRatio = [&](std::size_t k) {
      const auto& r = readings[static_cast<std::size_t>(mem[k].frame)];
      return r.cells[static_cast<std::size_t>(mem[k].cell)].areaPx /
             r.cells[static_cast<std::size_t>(r.mother)].areaPx;
    };
    std::vector<bool> lodged(n, false);
    for (std::size_t j = 0; j + static_cast<std::size_t>(minFrames) <= n; ++j) {
      double lo = 1e9, hi = 0;
      for (std::size_t k = j; k < j + static_cast<std::size_t>(minFrames); ++k) {
        lo = std::min(lo, areaRatio(k));
        hi = std::max(hi, areaRatio(k));
      }
      if (hi < 1.4 * lo)
        for (std::size_t k = j; k < j + static_cast<std::size_t>(minFrames); ++k) lodged[k] = true;
    }
    // A bud of a daughter's size that moves out from the mother without shrinking has
    // let go of her (the part the mother hid shows now): from then on, while she stays
    // at about that size, she is a daughter beside the mother, not a bud, however her
    // outline's gap to the mother is read from frame to frame.
    for (std::size_t k = 1; k < n; ++k) {
      const double before = areaRatio(k - 1), now = areaRatio(k);
      if (mem[k].frame - mem[k - 1].frame > 1 + kMissedFrames || before < kDaughterSize) continue;
      if (now < before || mem[k].dist - mem[k - 1].dist < kLetGoMove) continue;
      // She stays out in the next reading: a growing bud's outline, read with more or
      // less of the neck, jumps out for a frame and back.
      if (k + 1 < n && mem[k + 1].frame - mem[k].frame <= 1 + kMissedFrames &&
          mem[k + 1].dist - mem[k - 1].dist < kLetGoMove)
        continue;
      for (std::size_t j = k; j < n && areaRatio(j) > now / 1.4 && areaRatio(j) < now * 1.4; ++j)
        lodged[j] = true;
    }
    for (std::size_t k = 0; k < n; ++k)
      if (lodged[k]) out[static_cast<std::size_t>(mem[k].frame)].push_back(mem[k].cell);
  }
  return out;
}

double departedArea(const CropReading& before, const std::vector<int>& attachedBefore,
                    const CropReading& now, const std::vector<int>& attachedNow,
                    double backgroundSd, const CropReading* next,
                    const std::vector<int>& attachedNext) {
  if (before.mask.empty() || now.mask.empty() || now.mother < 0 || before.mother < 0) return 0;
  if (before.mask.size() != now.mask.size() || attachedBefore.empty()) return 0;
  if (now.difference.size() != now.mask.size()) return 0;
  auto labels = [](const CropReading& r, const std::vector<int>& cells) {
    std::vector<bool> in(r.cells.size() + 1, false);
    for (int c : cells) in[static_cast<std::size_t>(c + 1)] = true;
    return in;
  };
  const std::vector<bool> wasAttached = labels(before, attachedBefore);
  // Labels that are still part of the mother's body: she and her buds.
  std::vector<bool> joinedNow = labels(now, attachedNow);
  joinedNow[static_cast<std::size_t>(now.mother + 1)] = true;
  const bool haveNext = next && next->mother >= 0 && next->mask.size() == now.mask.size();
  std::vector<bool> joinedNext;
  if (haveNext) {
    joinedNext = labels(*next, attachedNext);
    joinedNext[static_cast<std::size_t>(next->mother + 1)] = true;
  }
  // A cell read apart from the mother now that covers a former bud has let go of her
  // only if she has also moved away from the mother (a separated daughter is pushed
  // off; a neighbour whose outline is merely read with a gap stays where she was),
  // and only if the next reading does not join those pixels to the mother again.
  const std::size_t nb = before.cells.size() + 1, nn = now.cells.size() + 1;
  std::vector<int> overlap(nb * nn, 0);
  for (int y = 0; y < now.mask.rows; ++y) {
    const auto* b = before.mask.ptr<std::uint16_t>(y);
    const auto* n = now.mask.ptr<std::uint16_t>(y);
    for (int x = 0; x < now.mask.cols; ++x)
      if (b[x] && wasAttached[b[x]] && n[x] && !joinedNow[n[x]]) ++overlap[n[x] * nb + b[x]];
  }
  const Cell& mb = before.cells[static_cast<std::size_t>(before.mother)];
  const Cell& mn = now.cells[static_cast<std::size_t>(now.mother)];
  const double rm = radiusOf(mn.areaPx);
  std::vector<bool> letGo(nn, false);
  for (std::size_t label = 1; label < nn; ++label) {
    // The former bud this cell covers most of.
    const auto first = overlap.begin() + static_cast<std::ptrdiff_t>(label * nb);
    const auto most = std::max_element(first, first + static_cast<std::ptrdiff_t>(nb));
    if (*most == 0) continue;
    const Cell& was = before.cells[static_cast<std::size_t>(most - first) - 1];
    const Cell& is = now.cells[label - 1];
    letGo[label] = std::hypot(is.x - mn.x, is.y - mn.y) - std::hypot(was.x - mb.x, was.y - mb.y) >=
                   kMovedOff * rm;
  }
  int gone = 0;
  for (int y = 0; y < now.mask.rows; ++y) {
    const auto* b = before.mask.ptr<std::uint16_t>(y);
    const auto* n = now.mask.ptr<std::uint16_t>(y);
    const float* d = now.difference.ptr<float>(y);
    const auto* nx = haveNext ? next->mask.ptr<std::uint16_t>(y) : nullptr;
    for (int x = 0; x < now.mask.cols; ++x) {
      if (!b[x] || !wasAttached[b[x]]) continue;
      if (n[x] == 0)
        gone += d[x] < backgroundSd;
      else if (letGo[n[x]])
        gone += !nx || !joinedNext[nx[x]];
    }
  }
  return gone / std::max(1.0, now.cells[static_cast<std::size_t>(now.mother)].areaPx);
}

std::vector<int> seamsAgainst(const CropReading& r, const FeatureContext& ctx,
                              const std::vector<int>& neighbours, double maxAreaRatio) {
  std::vector<int> out;
  if (neighbours.empty() || r.mask.empty() || r.mother < 0) return out;
  cv::Mat near = cv::Mat::zeros(r.mask.size(), CV_8U);
  for (int c : neighbours) near.setTo(255, r.mask == c + 1);
  cv::dilate(near, near, cv::getStructuringElement(cv::MORPH_RECT, {5, 5}));
  for (const auto& a : attachedCells(r, ctx)) {
    if (a.areaRatio >= maxAreaRatio) continue;
    if (std::find(neighbours.begin(), neighbours.end(), a.cell) != neighbours.end()) continue;
    if (cv::countNonZero(near & (r.mask == a.cell + 1)) > 0) out.push_back(a.cell);
  }
  return out;
}

FrameFeatures computeFeatures(const CropReading& r, const FeatureContext& ctx,
                              const std::vector<int>& excluded) {
  FrameFeatures f;
  const double expectedArea = std::numbers::pi * ctx.motherRadiusPx * ctx.motherRadiusPx;
  f.x[6] = std::log1p(std::max(0.0, r.cupStrength));
  f.x[7] = r.foregroundPx / expectedArea;
  f.x[4] = 3.0;  // no neighbour: far
  if (r.mother < 0) {
    f.motherContrast = f.motherTexture = f.motherAreaPx = std::numeric_limits<double>::quiet_NaN();
    return f;
  }
  const Cell& m = r.cells[static_cast<std::size_t>(r.mother)];
  const double rm = radiusOf(m.areaPx);
  f.hasMother = true;
  f.x[0] = 1;
  f.x[1] = m.areaPx / expectedArea;
  f.x[8] = m.eccentricity;
  f.x[9] = std::hypot(m.cupDxUm, m.cupDyUm) /
           std::max(1e-9, rm * std::sqrt(m.areaUm2 / std::max(1e-9, m.areaPx)));
  f.motherContrast = m.contrast;
  f.motherTexture = m.texture;
  f.motherAreaPx = m.areaPx;
  double nearestGap = 3.0, nearestArea = 0;
  std::vector<Attached> buds;
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    if (static_cast<int>(i) == r.mother) continue;
    const Cell& c = r.cells[i];
    const double gap = gapBetween(m, c) / std::max(1.0, rm);
    const bool lodged =
        std::find(excluded.begin(), excluded.end(), static_cast<int>(i)) != excluded.end();
    const bool isAttached = gap < ctx.attachGap && !lodged;
    if (lodged) {
      ++f.nearOthers;
    } else if (isAttached && c.areaPx < m.areaPx) {
      buds.push_back({c.x - m.x, c.y - m.y, c.areaPx / m.areaPx});
    } else if (gap < 1.0) {
      ++f.nearOthers;
    }
    if (!isAttached && gap < nearestGap) {
      nearestGap = std::max(0.0, gap);
      nearestArea = c.areaPx / m.areaPx;
    }
  }
  f.budRatio = oneBudRatio(buds);
  f.x[2] = f.budRatio;
  f.x[3] = static_cast<double>(buds.size());
  f.x[4] = nearestGap;
  f.x[5] = nearestArea;
  return f;
}

}  // namespace budledger::measure
