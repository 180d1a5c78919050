// What simulate writes: byte-identical for a seed, an OME-TIFF that libtiff's
// own tools read back, and the file layout other parts of the project rely on.
#include <gtest/gtest.h>
#include <tiffio.h>
#include <unistd.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <regex>
#include <sstream>

#include "core/base/sha256.h"
#include "sim_fixtures.h"

namespace budledger::demo {
namespace {

namespace fs = std::filesystem;

fs::path freshDir(const std::string& name) {
  // ctest runs each test in its own process, possibly in parallel: one folder per process.
  const fs::path p =
      fs::temp_directory_path() / ("budledger-test-demo-" + std::to_string(getpid()) + "-" + name);
  fs::remove_all(p);
  return p;
}

// Digest over every file's relative path and contents, in sorted order.
std::string treeDigest(const fs::path& root) {
  std::vector<fs::path> files;
  for (const auto& e : fs::recursive_directory_iterator(root))
    if (e.is_regular_file()) files.push_back(fs::relative(e.path(), root));
  std::sort(files.begin(), files.end());
  Sha256 h;
  for (const auto& f : files) {
    h.update(f.generic_string());
    h.update(sha256FileHex(root / f));
  }
  return h.finishHex();
}

std::string run(const std::string& cmd) {
  std::string out;
  FILE* p = popen(cmd.c_str(), "r");
  if (!p) return out;
  std::array<char, 4096> buf{};
  std::size_t n;
  while ((n = fread(buf.data(), 1, buf.size(), p)) > 0) out.append(buf.data(), n);
  pclose(p);
  return out;
}

std::string readAll(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

class Output : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = new fs::path(freshDir("out"));
    simulateExperiment(testing::tinyScenario(), *dir_);
  }
  static void TearDownTestSuite() {
    fs::remove_all(*dir_);
    delete dir_;
  }
  static fs::path* dir_;
};
fs::path* Output::dir_ = nullptr;

TEST_F(Output, SameSeedSameBytesOtherSeedOtherBytes) {
  const fs::path again = freshDir("again");
  SimulateOptions parallel;
  parallel.jobs = 2;  // threads must not change a byte
  simulateExperiment(testing::tinyScenario(), again, parallel);
  EXPECT_EQ(treeDigest(*dir_), treeDigest(again));

  Scenario other = testing::tinyScenario();
  other.seed += 1;
  const fs::path changed = freshDir("changed");
  simulateExperiment(other, changed);
  EXPECT_NE(treeDigest(*dir_), treeDigest(changed));
  fs::remove_all(again);
  fs::remove_all(changed);
}

TEST_F(Output, LayoutAndPositionsTable) {
  const Scenario s = testing::tinyScenario();
  for (const auto& p : positionsOf(s)) {
    EXPECT_TRUE(fs::exists(*dir_ / (p.name + ".ome.tif"))) << p.name;
    EXPECT_FALSE(fs::exists(*dir_ / (p.name + ".ome.tif.part"))) << p.name;
    for (const char* f : {"traps.csv", "events.csv", "lifespans.csv", "drift.csv"})
      EXPECT_TRUE(fs::exists(*dir_ / "truth" / p.name / f)) << p.name << " " << f;
  }
  EXPECT_EQ(readAll(*dir_ / "positions.csv"),
            "position,group,file,frames,interval_min,pixel_um\n"
            "ctrl-p1,ctrl,ctrl-p1.ome.tif,40,10,0.25\n"
            "long-p1,long,long-p1.ome.tif,40,10,0.25\n");
  EXPECT_EQ(readAll(*dir_ / "truth/ctrl-p1/traps.csv").substr(0, 20), "trap_id,row,col,x,y\n");
  EXPECT_EQ(readAll(*dir_ / "truth/ctrl-p1/events.csv").substr(0, 29),
            "trap_id,mother_id,frame,kind\n");
  EXPECT_EQ(readAll(*dir_ / "truth/ctrl-p1/lifespans.csv").substr(0, 59),
            "trap_id,mother_id,first_frame,last_frame,divisions,outcome\n");
  const std::string drift = readAll(*dir_ / "truth/ctrl-p1/drift.csv");
  EXPECT_EQ(drift.substr(0, 27), "frame,dx,dy\n0,0.0000,0.0000");
  // The scenario as used reads back to the same scenario.
  EXPECT_EQ(scenarioToJsonText(loadScenario(*dir_ / "scenario.json")), scenarioToJsonText(s));
}

TEST_F(Output, LibtiffToolsReadTheStack) {
  const std::string file = (*dir_ / "ctrl-p1.ome.tif").string();
  // tiffinfo (libtiff-tools): one directory per frame, 16 bits per sample.
  const std::string info = run(std::string(BUDLEDGER_TIFFINFO) + " '" + file + "' 2>&1");
  const std::regex dir("TIFF Directory at offset");
  EXPECT_EQ(
      std::distance(std::sregex_iterator(info.begin(), info.end(), dir), std::sregex_iterator()),
      40);
  EXPECT_NE(info.find("Bits/Sample: 16"), std::string::npos);
  EXPECT_NE(info.find("SizeT=\"40\""), std::string::npos);
  EXPECT_NE(info.find("TimeIncrement=\"10\" TimeIncrementUnit=\"min\""), std::string::npos);
  EXPECT_NE(info.find("PhysicalSizeX=\"0.25\" PhysicalSizeXUnit=\"µm\""), std::string::npos);
  // tiffdump: the raw tags; BitsPerSample (258) is SHORT 16 on every page.
  const std::string dump = run(std::string(BUDLEDGER_TIFFDUMP) + " '" + file + "' 2>&1");
  const std::regex bits("BitsPerSample \\(258\\) SHORT \\(3\\) 1<16>");
  EXPECT_EQ(
      std::distance(std::sregex_iterator(dump.begin(), dump.end(), bits), std::sregex_iterator()),
      40);
}

TEST_F(Output, PixelsReadBackExactly) {
  const Scenario s = testing::tinyScenario();
  const auto spec = positionsOf(s)[0];
  const PositionModel model = modelPosition(s, spec);
  std::vector<std::vector<std::uint16_t>> frames;
  renderPosition(s, model,
                 [&](int, const std::vector<std::uint16_t>& px) { frames.push_back(px); });

  TIFF* tif = TIFFOpen((*dir_ / (spec.name + ".ome.tif")).string().c_str(), "r");
  ASSERT_NE(tif, nullptr);
  int page = 0;
  do {
    std::uint32_t w = 0, h = 0;
    std::uint16_t bps = 0;
    TIFFGetField(tif, TIFFTAG_IMAGEWIDTH, &w);
    TIFFGetField(tif, TIFFTAG_IMAGELENGTH, &h);
    TIFFGetField(tif, TIFFTAG_BITSPERSAMPLE, &bps);
    ASSERT_EQ(bps, 16);
    ASSERT_EQ(static_cast<int>(w), model.device.width());
    ASSERT_EQ(static_cast<int>(h), model.device.height());
    std::vector<std::uint16_t> row(w);
    for (std::uint32_t y = 0; y < h; ++y) {
      ASSERT_EQ(TIFFReadScanline(tif, row.data(), y), 1);
      ASSERT_TRUE(std::equal(row.begin(), row.end(),
                             frames[static_cast<std::size_t>(page)].begin() + y * w))
          << "page " << page << " row " << y;
    }
    ++page;
  } while (TIFFReadDirectory(tif));
  TIFFClose(tif);
  EXPECT_EQ(page, s.frames);
}

TEST_F(Output, CompressedStacksHoldTheSamePixels) {
  Scenario s = testing::tinyScenario();
  s.frames = 5;
  s.groups.resize(1);
  const fs::path plain = freshDir("plain"), packed = freshDir("packed");
  simulateExperiment(s, plain);
  s.compression = "deflate";
  simulateExperiment(s, packed);
  auto pixels = [](const fs::path& f) {
    std::string all;
    TIFF* tif = TIFFOpen(f.string().c_str(), "r");
    if (!tif) return all;
    do {
      std::uint32_t w = 0, h = 0;
      TIFFGetField(tif, TIFFTAG_IMAGEWIDTH, &w);
      TIFFGetField(tif, TIFFTAG_IMAGELENGTH, &h);
      std::vector<std::uint16_t> row(w);
      for (std::uint32_t y = 0; y < h; ++y) {
        TIFFReadScanline(tif, row.data(), y);
        all.append(reinterpret_cast<const char*>(row.data()), row.size() * 2);
      }
    } while (TIFFReadDirectory(tif));
    TIFFClose(tif);
    return all;
  };
  const std::string a = pixels(plain / "ctrl-p1.ome.tif"), b = pixels(packed / "ctrl-p1.ome.tif");
  EXPECT_FALSE(a.empty());
  EXPECT_EQ(a, b);
  EXPECT_LT(fs::file_size(packed / "ctrl-p1.ome.tif"), fs::file_size(plain / "ctrl-p1.ome.tif"));
  fs::remove_all(plain);
  fs::remove_all(packed);
}

}  // namespace
}  // namespace budledger::demo
