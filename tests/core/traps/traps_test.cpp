// The trap lattice and layout from images alone, for several trap shapes
// and arrangements; supplied layouts; crops; the temporal median.
#include <gtest/gtest.h>
#include <opencv2/imgproc.hpp>

#include <fstream>
#include <set>

#include "core/base/error.h"
#include "core/traps/traps.h"
#include "tests/core/common/synthetic_scene.h"

namespace budledger::traps {
namespace {
using testing::SceneOptions;
using testing::SyntheticScene;

cv::Mat projectionOf(const SyntheticScene& scene, int frames = 7) {
  TemporalMedian median(scene.options().size, frames);
  for (int t = 0; t < frames; ++t) median.add(scene.render({{0, 0}, 1.0, 0, 12 * t}), {0, 0});
  return median.median();
}

struct Geometry {
  const char* name;
  SceneOptions options;
};

std::vector<Geometry> geometries() {
  std::vector<Geometry> g;
  SceneOptions base;
  base.size = {520, 400};
  g.push_back({"cups", base});
  SceneOptions staggered = base;
  staggered.latticeB = {32, 72};
  g.push_back({"staggered", staggered});
  SceneOptions round = base;
  round.trap = SceneOptions::roundPostCup();
  round.latticeA = {58, 0};
  round.latticeB = {-29, 66};
  g.push_back({"round posts, staggered", round});
  SceneOptions tilted = base;  // a chip mounted 2 degrees off
  const double c = std::cos(0.035), s = std::sin(0.035);
  tilted.latticeA = {64 * c, 64 * s};
  tilted.latticeB = {-72 * s, 72 * c};
  g.push_back({"tilted", tilted});
  return g;
}

TEST(Lattice, VectorsFromUnregisteredFramesForEveryGeometry) {
  for (const auto& g : geometries()) {
    const SyntheticScene scene(g.options);
    std::vector<cv::Mat> frames;  // drifting: the autocorrelation does not mind
    for (int t = 0; t < 4; ++t) frames.push_back(scene.render({{3.1 * t, -2.2 * t}, 1.0, 0, t}));
    const auto lat = findLattice(frames);
    ASSERT_TRUE(lat.has_value()) << g.name;
    // Same lattice, possibly another basis of it: compare after reduction.
    cv::Point2d a = g.options.latticeA, b = g.options.latticeB;
    if (b.x * a.x + b.y * a.y > 0.5 * a.dot(a)) b -= a;
    if (b.x * a.x + b.y * a.y < -0.5 * a.dot(a)) b += a;
    // (The trap finder refits the lattice to every matched trap; this is
    // only the first estimate.)
    EXPECT_LT(cv::norm(lat->a - a), 0.15) << g.name << " a=" << lat->a;
    EXPECT_LT(cv::norm(lat->b - b), 0.15) << g.name << " b=" << lat->b;
    EXPECT_GT(lat->b.y, 0) << g.name;
  }
}

TEST(Lattice, NoneInAnImageWithoutRepeats) {
  cv::Mat noise(300, 400, CV_16U);
  cv::randu(noise, 1000, 3000);
  cv::GaussianBlur(noise, noise, cv::Size(), 3);
  EXPECT_FALSE(findLattice({noise}).has_value());
}

TEST(Traps, EveryTrapFoundWithStableCentresForEveryGeometry) {
  for (const auto& g : geometries()) {
    const SyntheticScene scene(g.options);
    const cv::Mat P = projectionOf(scene);
    const auto lat = findLattice({P});
    ASSERT_TRUE(lat) << g.name;
    const TrapFinding found = findTraps(P, *lat);
    const auto truth = scene.allTrapCentres();
    // Every trap found is a trap of the scene, one to one, and all share
    // one offset between our cup centre and the scene's.
    std::vector<cv::Point2d> diffs;
    std::set<size_t> used;
    for (const auto& t : found.layout.traps) {
      size_t best = 0;
      for (size_t j = 1; j < truth.size(); ++j)
        if (cv::norm(truth[j] - t.centre) < cv::norm(truth[best] - t.centre)) best = j;
      ASSERT_LT(cv::norm(truth[best] - t.centre), 10.0) << g.name;
      EXPECT_TRUE(used.insert(best).second) << g.name;
      diffs.push_back(t.centre - truth[best]);
    }
    cv::Point2d offset(0, 0);
    for (const auto& d : diffs) offset += d;
    offset *= 1.0 / static_cast<double>(diffs.size());
    for (const auto& d : diffs) EXPECT_LT(cv::norm(d - offset), 0.5) << g.name;
    // Every scene trap whose centre is inside and which shows at least half
    // of itself (the finder's threshold is 40%) is found.
    const cv::Rect2d frame(0, 0, g.options.size.width, g.options.size.height);
    for (size_t j = 0; j < truth.size(); ++j) {
      const cv::Point2d c = truth[j] + offset;
      const cv::Rect2d support = found.layout.support + c;
      const bool shown = (support & frame).area() >= 0.5 * support.area();
      if (frame.contains(c) && shown) {
        EXPECT_TRUE(used.count(j)) << g.name << " missed trap at " << c;
      }
    }
    EXPECT_LT(found.fitResidualPx, 0.5) << g.name;
    // Row-major ids, rows top to bottom, columns left to right.
    for (size_t i = 0; i < found.layout.traps.size(); ++i) {
      const Trap& t = found.layout.traps[i];
      EXPECT_EQ(t.id, static_cast<int>(i));
      if (i == 0) continue;
      const Trap& p = found.layout.traps[i - 1];
      const bool next =
          t.row > p.row || (t.row == p.row && t.col == p.col + 1 && t.centre.x > p.centre.x);
      EXPECT_TRUE(next) << g.name << " trap " << i;
    }
  }
}

TEST(Traps, ArraysThatDoNotFillTheFrameGiveNoTrapsOutsideThem) {
  SceneOptions o;
  o.size = {520, 400};
  const SyntheticScene scene(o);
  cv::Mat P = projectionOf(scene);
  // A blank band (a channel wall) across the lower third of the frame.
  P.rowRange(270, 400).setTo(cv::mean(P.rowRange(0, 20))[0]);
  const auto lat = findLattice({P});
  ASSERT_TRUE(lat);
  const TrapFinding found = findTraps(P, *lat);
  int expected = 0;
  // Rows at y = 44, 116, 188, 260 show; the row at 332 lies in the blank band.
  for (const auto& c : scene.trapCentres()) expected += c.y < 300 ? 1 : 0;
  EXPECT_EQ(static_cast<int>(found.layout.traps.size()), expected);
  for (const auto& t : found.layout.traps) EXPECT_LT(t.centre.y, 270) << t.centre;
  EXPECT_GT(found.sitesRejected, 0);
}

TEST(Traps, TrapsCutByTheEdgeAreFlagged) {
  SceneOptions o;
  o.size = {520, 400};
  o.origin = {6, 30};  // the first column sits half outside the frame
  const SyntheticScene scene(o);
  const cv::Mat P = projectionOf(scene);
  TrapFinding found = findTraps(P, *findLattice({P}));
  ASSERT_FALSE(found.layout.traps.empty());
  flagEdges(found.layout, o.size, {0, 0}, {0, 0});
  int edge = 0;
  for (const auto& t : found.layout.traps) {
    const bool inside = t.centre.x + found.layout.support.x >= 0 &&
                        t.centre.y + found.layout.support.y >= 0 &&
                        t.centre.x + found.layout.support.br().x <= o.size.width &&
                        t.centre.y + found.layout.support.br().y <= o.size.height;
    EXPECT_EQ(t.edge, !inside);
    edge += t.edge ? 1 : 0;
  }
  EXPECT_GT(edge, 0);
  // Drift that carries interior traps out of the frame flags them too.
  TrapLayout moved = found.layout;
  flagEdges(moved, o.size, {0, 0}, {120, 0});
  int movedEdge = 0;
  for (const auto& t : moved.traps) movedEdge += t.edge ? 1 : 0;
  EXPECT_GT(movedEdge, edge);
}

TEST(Numbering, RowsByClusteringWithoutALattice) {
  std::vector<Trap> traps;
  for (double y : {40.0, 120.0, 200.0})
    for (double x : {300.0, 100.0, 200.0}) traps.push_back({0, 0, 0, {x, y + x / 100.0}, false, 1});
  numberTraps(traps, std::nullopt);
  for (size_t i = 0; i < traps.size(); ++i) {
    EXPECT_EQ(traps[i].id, static_cast<int>(i));
    EXPECT_EQ(traps[i].row, static_cast<int>(i / 3));
    EXPECT_EQ(traps[i].col, static_cast<int>(i % 3));
  }
}

class SuppliedLayout : public ::testing::Test {
 protected:
  std::filesystem::path write(const std::string& text) {
    path_ = std::filesystem::temp_directory_path() /
            ("budledger_traps_" +
             std::to_string(::testing::UnitTest::GetInstance()->random_seed()) + ".csv");
    std::ofstream(path_) << text;
    return path_;
  }
  void TearDown() override { std::filesystem::remove(path_); }
  std::filesystem::path path_;
};

TEST_F(SuppliedLayout, ExportedColumnsRoundTripAndFilterByPosition) {
  const auto file = write(
      "position,trap_id,row,col,x,y,edge\n"
      "pos1,0,0,0,40.5,30.25,0\n"
      "pos1,1,0,1,104.5,30.25,1\n"
      "pos2,0,0,0,11,12,0\n");
  const auto rows = readTrapsCsv(file);
  ASSERT_EQ(rows.size(), 3u);
  const TrapLayout layout = layoutFromSupplied(rows, "pos1", file, nullptr);
  ASSERT_EQ(layout.traps.size(), 2u);
  EXPECT_EQ(layout.source, TrapLayout::Source::Supplied);
  EXPECT_EQ(layout.traps[1].id, 1);
  EXPECT_DOUBLE_EQ(layout.traps[1].centre.x, 104.5);
  EXPECT_GT(layout.crop.width, 20);  // from the spacing of the centres
  EXPECT_THROW(layoutFromSupplied(rows, "pos9", file, nullptr), InputError);
}

TEST_F(SuppliedLayout, CentresOnlyAreNumberedRowMajor) {
  const auto file = write("x,y\n200,50\n100,52\n100,150\n200,151\n");
  const TrapLayout layout = layoutFromSupplied(readTrapsCsv(file), "any", file, nullptr);
  ASSERT_EQ(layout.traps.size(), 4u);
  EXPECT_EQ(layout.traps[0].centre, cv::Point2d(100, 52));
  EXPECT_EQ(layout.traps[1].centre, cv::Point2d(200, 50));
  EXPECT_EQ(layout.traps[2].row, 1);
}

TEST_F(SuppliedLayout, BadFilesNameTheLine) {
  const auto check = [&](const std::string& text, const std::string& part) {
    const auto file = write(text);
    try {
      layoutFromSupplied(readTrapsCsv(file), "p", file, nullptr);
      ADD_FAILURE() << "accepted: " << text;
    } catch (const InputError& e) {
      EXPECT_NE(std::string(e.what()).find(part), std::string::npos) << e.what();
      EXPECT_EQ(e.file(), file.string());
    }
  };
  check("row,col\n1,2\n", "columns x and y");
  check("x,y\n1,2\n3,oops\n", "line 3: x and y must be numbers");
  check("x,y,trap_id,row,col\n1,2,0,0,0\n5,6,0,0,1\n", "trap_id 0 appears twice");
  check("x,y\n", "lists no traps");
  EXPECT_THROW(readTrapsCsv("/nonexistent/traps.csv"), InputError);
}

TEST(Crops, FollowTheDriftWholePixelAndSubPixel) {
  cv::Mat frame(100, 120, CV_16U);
  for (int y = 0; y < frame.rows; ++y)
    for (int x = 0; x < frame.cols; ++x)
      frame.at<std::uint16_t>(y, x) = static_cast<std::uint16_t>(x + 1000 * y);
  const cv::Rect box(-5, -4, 11, 9);
  cv::Mat crop;
  cropAt(frame, {50, 40}, {7, -3}, box, CropSampling::Nearest, crop);
  ASSERT_EQ(crop.size(), box.size());
  EXPECT_EQ(crop.at<std::uint16_t>(0, 0), frame.at<std::uint16_t>(40 - 3 - 4, 50 + 7 - 5));
  cropAt(frame, {50, 40}, {7.5, -3.0}, box, CropSampling::Linear, crop);
  EXPECT_EQ(crop.at<std::uint16_t>(0, 0), 52 + 1000 * 33);  // x = 52.5 rounds half up
  // Past the edge the border repeats.
  cropAt(frame, {2, 2}, {0, 0}, box, CropSampling::Nearest, crop);
  EXPECT_EQ(crop.at<std::uint16_t>(0, 0), frame.at<std::uint16_t>(0, 0));
  EXPECT_EQ(crop.at<std::uint16_t>(8, 10), frame.at<std::uint16_t>(6, 7));
}

TEST(Crops, AWindowIsThatPartOfTheWholeCropPixelForPixel) {
  // The engine cuts only its window in the second pass; its measurements must not
  // change, so the window must equal the whole crop's pixels exactly, inside the frame,
  // across its edge, at sub-pixel drifts of either sign, and for both samplings.
  cv::RNG rng(11);
  cv::Mat frame(90, 110, CV_16U);
  rng.fill(frame, cv::RNG::UNIFORM, 0, 65535);
  const cv::Rect box(-20, -15, 41, 31);
  const cv::Rect window(7, 4, 19, 22);
  for (const cv::Point2d centre : {cv::Point2d(55, 45), cv::Point2d(8, 80), cv::Point2d(100, 6)})
    for (const cv::Point2d drift : {cv::Point2d(0, 0), cv::Point2d(3.37, -2.81),
                                    cv::Point2d(-0.5, 0.25), cv::Point2d(-7.93, 11.06)})
      for (const auto sampling : {CropSampling::Nearest, CropSampling::Linear}) {
        cv::Mat whole, part;
        cropAt(frame, centre, drift, box, sampling, whole);
        cropAt(frame, centre, drift, box, sampling, part, window);
        ASSERT_EQ(part.size(), window.size());
        EXPECT_EQ(cv::countNonZero(part != whole(window)), 0)
            << centre << " " << drift << " " << static_cast<int>(sampling);
      }
}

TEST(TemporalMedianTest, MatchesASortAndRemovesPassingCells) {
  cv::RNG rng(4);
  const cv::Size size(37, 23);
  for (int n : {1, 2, 5, 8, 15}) {
    TemporalMedian median(size, n);
    std::vector<cv::Mat> frames;
    for (int k = 0; k < n; ++k) {
      cv::Mat f(size, CV_16U);
      rng.fill(f, cv::RNG::UNIFORM, 0, 60000);
      frames.push_back(f);
      median.add(f, {0, 0});
    }
    const cv::Mat m = median.median();
    for (int y = 0; y < size.height; ++y)
      for (int x = 0; x < size.width; ++x) {
        std::vector<int> v;
        for (const auto& f : frames) v.push_back(f.at<std::uint16_t>(y, x));
        std::sort(v.begin(), v.end());
        ASSERT_EQ(m.at<float>(y, x), static_cast<float>(v[static_cast<size_t>(n / 2)])) << n;
      }
  }
  // Shifts are undone: a frame moved by (2, 1) lands back in place.
  cv::Mat base(40, 50, CV_16U, cv::Scalar(100));
  base(cv::Rect(20, 15, 5, 5)).setTo(900);
  cv::Mat moved(40, 50, CV_16U, cv::Scalar(100));
  moved(cv::Rect(22, 16, 5, 5)).setTo(900);
  TemporalMedian one(base.size(), 1);
  one.add(moved, {2, 1});
  EXPECT_EQ(one.median().at<float>(17, 22), 900.0f);
  EXPECT_EQ(spreadFrames(10, 4), (std::vector<int>{0, 3, 6, 9}));
  EXPECT_EQ(spreadFrames(3, 15), (std::vector<int>{0, 1, 2}));
}

TEST(StructureMapTest, HighOnPostsLowBetweenThem) {
  SceneOptions o;
  o.size = {520, 400};
  const SyntheticScene scene(o);
  const cv::Mat f = scene.render({});
  const cv::Mat w = structureMap(f, *findLattice({f}));
  const cv::Point2d c = scene.trapCentres()[5];
  // The left wall of the default cup runs from (-11,-10) to (-7,7) around the centre.
  double onWall = 0;
  for (int dy = -8; dy <= 5; ++dy)
    onWall = std::max(onWall,
                      static_cast<double>(w.at<float>(int(c.y + dy), int(c.x - 9 - dy / 4.0 - 3))));
  EXPECT_GT(onWall, 0.5);
  EXPECT_LT(w.at<float>(int(c.y + 36), int(c.x + 32)), 0.1);  // open medium between traps
}

}  // namespace
}  // namespace budledger::traps
