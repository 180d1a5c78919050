#include "core/measure/features.h"

#include <gtest/gtest.h>

#include <numbers>

#include <opencv2/imgproc.hpp>

#include "core/measure/background.h"
#include "core/measure/occupancy.h"
#include "core/measure/segment.h"
#include "render.h"

namespace budledger::measure {
namespace {

using testing::Optics;
using testing::Scene;

CropReading readScene(const Scene& s, std::uint64_t seed, bool keepMask = false) {
  Optics o;
  o.halo = 100;  // moderate; strong halos are a known weak look (segment_test.cpp)
  const cv::Mat bg = testing::renderBackground(s, o);
  SegmentParams p;
  p.motherRadiusPx = 8;
  p.polarity = -1;
  p.keepMask = keepMask;
  Scene empty = s;
  empty.cells.clear();
  const double noise = estimateNoise(testing::render(empty, o, seed + 99), bg, 1.0);
  return segmentCrop(testing::render(s, o, seed), bg, noise, {s.cupX, s.cupY, 0.27}, p);
}

FeatureContext context() {
  FeatureContext c;
  c.motherRadiusPx = 8;
  return c;
}

// Paints a disk into a kept mask (over what is there) and returns its cell, with its
// outline gap to the mother as the segmentation would have measured it.
Cell paintCell(CropReading& r, double x, double y, double radius, int label, double gap = 0) {
  cv::circle(r.mask, {static_cast<int>(x), static_cast<int>(y)}, static_cast<int>(radius),
             cv::Scalar(label), cv::FILLED);
  Cell c;
  c.x = x;
  c.y = y;
  c.areaPx = cv::countNonZero(r.mask == label);
  c.gapToMotherPx = gap;
  return c;
}

TEST(Features, BudAttachedAndDaughterApart) {
  Scene withBud;
  withBud.cells = {{32, 30, 8, 8}, {32, 18.5, 4.5, 4.5}};
  const FrameFeatures b = computeFeatures(readScene(withBud, 1), context());
  EXPECT_TRUE(b.hasMother);
  EXPECT_GT(b.budRatio, 0.1);
  Scene withDaughter;
  withDaughter.cells = {{32, 30, 8, 8}, {32, 10, 6, 6}};
  const FrameFeatures d = computeFeatures(readScene(withDaughter, 2), context());
  EXPECT_TRUE(d.hasMother);
  EXPECT_EQ(d.budRatio, 0.0);
  EXPECT_LT(d.x[4], 3.0);  // but a neighbour is seen
}

// A bud squeezed into the gap between two posts is long and thin: its outline nearly
// touches the mother while a disk of its area would lie well away from her. Its pieces,
// when the segmentation breaks it, are one bud, not crowding.
TEST(Features, SqueezedBudIsAttachedByItsOutlineGapAndItsPiecesAddUp) {
  CropReading r;
  Cell m;
  m.x = 32;
  m.y = 30;
  m.areaPx = std::numbers::pi * 8 * 8;
  m.gapToMotherPx = 0;
  m.role = CellRole::Mother;
  Cell piece;
  piece.x = 31;
  piece.y = 46;  // centre 16 px from hers: as disks of their areas, 6.8 px apart
  piece.areaPx = 20;
  piece.gapToMotherPx = 1.5;  // as measured between the outlines
  Cell lower = piece;
  lower.x = 34;
  lower.y = 49;
  lower.areaPx = 12;
  lower.gapToMotherPx = 2.0;
  r.cells = {m, piece, lower};
  r.mother = 0;
  const FrameFeatures f = computeFeatures(r, context());
  EXPECT_NEAR(f.budRatio, 32 / m.areaPx, 1e-9);
  EXPECT_EQ(f.x[3], 2);  // two attached pieces
  EXPECT_EQ(f.nearOthers, 0);
  // Without outline gaps (older readings), disks decide: both pieces are apart.
  for (auto& c : r.cells) c.gapToMotherPx = -1;
  const FrameFeatures d = computeFeatures(r, context());
  EXPECT_EQ(d.budRatio, 0.0);
  EXPECT_GE(d.nearOthers, 1);  // and read as crowding
}

// A mother carries one bud at a time (common practice). A daughter who has separated
// but still presses against her on one side while the next bud shows on the other is
// not part of the bud: the ratio is the new bud's alone, so the separation and the new
// bud show. A small second piece beside a small bud still adds up.
TEST(Features, DaughterOnTheOtherSideOfANewBudIsNoPartOfIt) {
  CropReading r;
  Cell m;
  m.x = 32;
  m.y = 30;
  m.areaPx = std::numbers::pi * 8 * 8;  // about 201 px
  m.gapToMotherPx = 0;
  m.role = CellRole::Mother;
  Cell daughter;  // below her, 0.6 of her area
  daughter.x = 32;
  daughter.y = 44;
  daughter.areaPx = 120;
  daughter.gapToMotherPx = 0;
  Cell bud = daughter;  // above her, new
  bud.y = 20;
  bud.areaPx = 12;
  r.cells = {m, daughter, bud};
  r.mother = 0;
  EXPECT_NEAR(computeFeatures(r, context()).budRatio, 12 / m.areaPx, 1e-9);
  // Both small (the daughter gone, a sliver read on the other side): they add up, as
  // nothing there is of a daughter's size.
  r.cells[1].areaPx = 30;
  EXPECT_NEAR(computeFeatures(r, context()).budRatio, 42 / m.areaPx, 1e-9);
  // On one side, the same two cells are one bud cut in two.
  r.cells[1].areaPx = 120;
  r.cells[2].y = 46;
  r.cells[2].x = 38;
  EXPECT_NEAR(computeFeatures(r, context()).budRatio, 132 / m.areaPx, 1e-9);
}

TEST(Features, UnchangingNeighbourIsLodgedAndGrowingBudIsNot) {
  // Twelve frames: a bud that grows, then a neighbour that stays the same size.
  std::vector<CropReading> growing, lodged;
  for (int t = 0; t < 12; ++t) {
    Scene g;
    const double r = 2.0 + 0.35 * t;
    g.cells = {{32, 30, 8, 8}, {32, 30 - 8 - 0.6 * r, r, r}};
    growing.push_back(readScene(g, 10 + static_cast<std::uint64_t>(t)));
    Scene l;
    l.cells = {{32, 30, 8, 8}, {32, 18, 4.5, 4.5}};  // touching
    lodged.push_back(readScene(l, 40 + static_cast<std::uint64_t>(t)));
  }
  const auto none = lodgedNeighbours(growing, context(), 6);
  for (const auto& f : none) EXPECT_TRUE(f.empty());
  const auto all = lodgedNeighbours(lodged, context(), 6);
  int flagged = 0;
  for (const auto& f : all) flagged += !f.empty();
  EXPECT_GE(flagged, 10);
}

// A bud of a daughter's size that moves out from the mother, her whole outline now in
// view, has let go: from then on she is a daughter, not a bud, though she stays for less
// than a lodged neighbour must and her outline still touches the mother's.
TEST(Features, BudThatMovesOffIsADaughterNotABud) {
  std::vector<CropReading> readings;
  for (int t = 0; t < 9; ++t) {
    Scene s;
    // Overlapping the mother, then 0.5 px apart from her: the centre moves 2.5 px out.
    const double y = t < 5 ? 30 - 8 - 0.6 * 5 : 30 - 8 - 5 - 0.5;
    s.cells = {{32, 30, 8, 8}, {32, y, 5, 5}};
    readings.push_back(readScene(s, 120 + static_cast<std::uint64_t>(t)));
  }
  for (int t = 0; t < 5; ++t) ASSERT_EQ(attachedCells(readings[t], context()).size(), 1u) << t;
  const auto lodged = lodgedNeighbours(readings, context(), 15);  // far longer than she stays
  for (int t = 0; t < 5; ++t) EXPECT_TRUE(lodged[t].empty()) << "a bud at " << t;
  for (int t = 5; t < 9; ++t) EXPECT_EQ(lodged[t].size(), 1u) << "a daughter at " << t;
}

// A bud near her full size whose outline is read with less of the neck for one frame
// jumps out as far as a daughter who lets go, and back in the next reading. She is still
// a bud: taken for a let-go daughter, her last frames read no bud at all and the
// separation was called two to four frames early (fresh simulated seeds).
TEST(Features, BudReadFurtherOutForOneFrameHasNotLetGo) {
  std::vector<CropReading> readings;
  for (int t = 0; t < 9; ++t) {
    Scene s;
    const double y = t == 4 ? 30 - 8 - 5 - 0.5 : 30 - 8 - 0.6 * 5;  // 2.5 px out at t = 4
    s.cells = {{32, 30, 8, 8}, {32, y, 5, 5}};
    readings.push_back(readScene(s, 160 + static_cast<std::uint64_t>(t)));
  }
  const auto lodged = lodgedNeighbours(readings, context(), 15);
  for (int t = 0; t < 9; ++t) EXPECT_TRUE(lodged[t].empty()) << "a bud at " << t;
}

// A lodged daughter is not read the same in every frame: for a while she sits a little
// apart from the mother, and one frame has no reading at all (flicker, defocus). Neither
// may restart the count of how long she has stayed.
TEST(Features, LodgedNeighbourReadApartOrMissedForAFrameStaysLodged) {
  std::vector<CropReading> readings;
  for (int t = 0; t < 12; ++t) {
    Scene l;
    const double apart = t >= 3 && t <= 5 ? 1.5 : 0.0;  // px between the outlines
    l.cells = {{32, 30, 8, 8}, {32, 17.5 - apart, 4.5, 4.5}};
    readings.push_back(t == 7 ? CropReading{} : readScene(l, 70 + static_cast<std::uint64_t>(t)));
  }
  ASSERT_LT(readings[7].mother, 0);
  for (int t = 3; t <= 5; ++t) EXPECT_TRUE(attachedCells(readings[t], context()).empty());
  const auto lodged = lodgedNeighbours(readings, context(), 8);
  int flagged = 0;
  for (const auto& f : lodged) flagged += !f.empty();
  EXPECT_GE(flagged, 10);  // of the 11 with a reading
}

// Between the mother and a daughter pressed against her (a lodged or let-go neighbour)
// the segmentation may leave a small piece of the seam; it is no bud. A bud elsewhere on
// the mother, or a piece large enough to be a bud, still is.
TEST(Features, SeamAgainstAPressedNeighbourIsNoBud) {
  CropReading r;
  r.mask = cv::Mat::zeros(64, 64, CV_16U);
  // Painted in order, each over the one before: mother, daughter, seam, bud.
  Cell m = paintCell(r, 32, 26, 8, 1), daughter = paintCell(r, 32, 40.5, 6, 2, 0.5),
       seam = paintCell(r, 32, 34.5, 2, 3), bud = paintCell(r, 22, 20, 3, 4);
  r.cells = {m, daughter, seam, bud};
  r.mother = 0;
  ASSERT_EQ(attachedCells(r, context()).size(), 3u);
  const auto seams = seamsAgainst(r, context(), {1}, 0.15);
  ASSERT_EQ(seams.size(), 1u);
  EXPECT_EQ(seams[0], 2);
  EXPECT_TRUE(seamsAgainst(r, context(), {}, 0.15).empty());   // nobody pressed against her
  EXPECT_TRUE(seamsAgainst(r, context(), {1}, 0.05).empty());  // large enough to be a bud
}

// A daughter leaving through the outlet gap is read in two: her part still between the
// posts touches the mother and looked like a bud a tenth of the mother's size, so the bud
// ratio hardly fell at the separation (fresh simulated seeds). A small attached piece
// touching a daughter-sized cell already apart from the mother is a seam; a small bud
// elsewhere on her is not.
TEST(Features, PieceBetweenTheMotherAndALeavingDaughterIsNoBud) {
  CropReading r;
  r.mask = cv::Mat::zeros(64, 64, CV_16U);
  Cell m = paintCell(r, 32, 24, 8, 1), daughter = paintCell(r, 32, 43, 6, 2, 5),
       piece = paintCell(r, 32, 34, 2.5, 3), bud = paintCell(r, 22, 18, 2.5, 4);
  r.cells = {m, daughter, piece, bud};
  r.mother = 0;
  ASSERT_EQ(attachedCells(r, context()).size(), 2u);  // the piece and the bud
  const auto apart = daughtersApart(r, context());
  ASSERT_EQ(apart, std::vector<int>{1});
  EXPECT_EQ(seamsAgainst(r, context(), apart, 0.15), std::vector<int>{2});
  r.cells[1].areaPx = 0.1 * r.cells[0].areaPx;  // a small cell apart is no daughter
  EXPECT_TRUE(daughtersApart(r, context()).empty());
}

TEST(Features, DepartureSeesADaughterLeaveNotAMissedBud) {
  Scene before;
  before.cells = {{32, 30, 8, 8}, {32, 17.5, 5, 5}};
  Scene after;
  after.cells = {{32, 30, 8, 8}};
  const CropReading b = readScene(before, 5, true), a = readScene(after, 6, true);
  std::vector<int> attached;
  for (const auto& c : attachedCells(b, context())) attached.push_back(c.cell);
  ASSERT_FALSE(attached.empty());
  EXPECT_GT(departedArea(b, attached, a, {}, 1.75), 0.2);
  // The same bud still there: nothing departed.
  const CropReading again = readScene(before, 7, true);
  std::vector<int> attachedAgain;
  for (const auto& c : attachedCells(again, context())) attachedAgain.push_back(c.cell);
  ASSERT_FALSE(attachedAgain.empty());
  EXPECT_LT(departedArea(b, attached, again, attachedAgain, 1.75), 0.05);
  // Read apart from the mother in this reading, but where she was: no separation.
  EXPECT_LT(departedArea(b, attached, again, {}, 1.75), 0.05);
}

// A daughter who separates but stays in view (lingering, lodged) covers much of where
// the bud was; she has let go of the mother all the same, unless the next reading joins
// her to the mother again.
TEST(Features, DepartureSeesADaughterLetGoWhoStaysInView) {
  Scene before;
  before.cells = {{32, 30, 8, 8}, {32, 18.5, 4.5, 4.5}};
  Scene after;
  after.cells = {{32, 30, 8, 8}, {32, 14.5, 5, 5}};  // pushed off, 3 px between outlines
  const CropReading b = readScene(before, 11, true), a = readScene(after, 12, true),
                    stays = readScene(after, 13, true), back = readScene(before, 14, true);
  std::vector<int> attached, attachedBack;
  for (const auto& c : attachedCells(b, context())) attached.push_back(c.cell);
  for (const auto& c : attachedCells(back, context())) attachedBack.push_back(c.cell);
  ASSERT_FALSE(attached.empty());
  ASSERT_TRUE(attachedCells(a, context()).empty());
  ASSERT_EQ(a.cells.size(), 2u);
  const double letGo = departedArea(b, attached, a, {}, 1.75, &stays, {});
  const double rejoined = departedArea(b, attached, a, {}, 1.75, &back, attachedBack);
  // Where she was and no cell is now counts either way (0.087 of the mother's area
  // here); where she still covers it, only if she stays apart (0.174 in all).
  EXPECT_GT(letGo, 0.14);
  EXPECT_GT(letGo, 1.5 * rejoined);
}

// Mothers as they are: sizes, seats and buds differ from trap to trap and frame to frame.
Scene occupiedScene(int t, int k) {
  Scene s;
  const double r = 6.0 + 0.3 * ((t * 7 + k * 3) % 9);
  const double dx = ((t * 5 + k) % 5) - 2.0, dy = ((t + 2 * k) % 3) - 1.0;
  s.cells = {{32 + dx, 30 + dy, r, r * 0.95}};
  if ((t + k) % 3)
    s.cells.push_back({32 + dx, 30 + dy - r - 1.5 - 0.2 * k, 1.5 + 0.3 * k, 1.5 + 0.3 * k});
  return s;
}

TEST(Background, EmptySamplesAreFoundAcrossTraps) {
  // Ten traps, twelve samples each; traps 0-2 empty throughout, trap 3 empty for the first
  // half, the others always hold a mother.
  Optics o;
  std::vector<std::vector<cv::Mat>> samples(10);
  for (int t = 0; t < 10; ++t)
    for (int k = 0; k < 12; ++k) {
      Scene s;
      const bool empty = t < 3 || (t == 3 && k < 6);
      if (!empty) s = occupiedScene(t, k);
      samples[static_cast<std::size_t>(t)].push_back(
          normaliseCrop(testing::render(s, o, static_cast<std::uint64_t>(100 * t + k))));
    }
  BackgroundOptions bo;
  bo.cupRadiusPx = 9;
  const auto m = BackgroundModel::learn(samples, 32, 30, bo);
  EXPECT_EQ(m.quality(), BackgroundModel::Quality::Good);
  for (int t = 0; t < 3; ++t) EXPECT_EQ(m.empties()[static_cast<std::size_t>(t)].size(), 12u);
  EXPECT_EQ(m.empties()[3].size(), 6u);
  for (int t = 4; t < 10; ++t) EXPECT_TRUE(m.empties()[static_cast<std::size_t>(t)].empty()) << t;
  EXPECT_EQ(m.source(0), BackgroundModel::Source::Own);
  EXPECT_EQ(m.source(5), BackgroundModel::Source::Lattice);
}

TEST(Background, NoEmptyTrapIsSaidSo) {
  Optics o;
  std::vector<std::vector<cv::Mat>> samples(6);
  for (int t = 0; t < 6; ++t)
    for (int k = 0; k < 10; ++k) {
      const Scene s = occupiedScene(t, k);
      samples[static_cast<std::size_t>(t)].push_back(
          normaliseCrop(testing::render(s, o, static_cast<std::uint64_t>(7 * t + k))));
    }
  BackgroundOptions bo;
  bo.cupRadiusPx = 9;
  const auto m = BackgroundModel::learn(samples, 32, 30, bo);
  EXPECT_EQ(m.quality(), BackgroundModel::Quality::NoEmptyTrap);
  EXPECT_EQ(m.source(0), BackgroundModel::Source::Fallback);
}

TEST(Occupancy, BuiltInModelLoadsAndGivesProbabilities) {
  const auto m = OccupancyModel::builtIn();
  FrameFeatures f;
  const auto p = m.predict(f);
  double sum = 0;
  for (double v : p) {
    EXPECT_GE(v, 0.0);
    sum += v;
  }
  EXPECT_NEAR(sum, 1.0, 1e-9);
}

TEST(Occupancy, TrainingIsDeterministicAndLearnsSeparableClasses) {
  // Three classes told apart by two features; the rest are noise.
  std::vector<TrainingExample> data;
  testing::Optics unused;
  (void)unused;
  std::uint64_t state = 12345;
  auto next = [&] {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    return static_cast<double>(state >> 11) * 0x1.0p-53;
  };
  for (int i = 0; i < 600; ++i) {
    TrainingExample e;
    e.label = i % 3;
    for (auto& v : e.x) v = next();
    e.x[0] = e.label == 0 ? 0.0 : 1.0;                           // mother present
    e.x[2] = e.label == 2 ? 0.3 + 0.2 * next() : 0.05 * next();  // bud ratio
    data.push_back(e);
  }
  const auto a = OccupancyModel::train(data, {});
  const auto b = OccupancyModel::train(data, {});
  EXPECT_EQ(a.toJson(), b.toJson());
  int correct = 0;
  for (const auto& e : data) {
    const auto p = a.predictThree(e.x);
    correct += static_cast<int>(std::max_element(p.begin(), p.end()) - p.begin()) == e.label;
  }
  EXPECT_GT(correct, 590);
  // Round trip through the file format.
  EXPECT_EQ(OccupancyModel::fromJson(a.toJson()).toJson(), a.toJson());
}

}  // namespace
}  // namespace budledger::measure
