// bench_simulate [REPEATS] — times one position of the size (240 frames,
// 6×7 traps, 0.25 µm/px, default optics) on one thread: the biology and truth,
// rendering, and rendering plus writing the OME-TIFF (uncompressed and deflate).
// Prints CPU seconds (what one core spends; robust on a shared machine) and
// wall seconds, the best of REPEATS runs.
#include <ctime>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <functional>
#include <string>

#include "demo/simulator.h"
#include "demo/tiff_writer.h"

using namespace budledger::demo;

namespace {

struct Timing {
  double cpu = 1e300, wall = 1e300;
};

Timing best(int repeats, const std::function<void()>& work) {
  Timing t;
  for (int i = 0; i < repeats; ++i) {
    const std::clock_t c0 = std::clock();
    const auto w0 = std::chrono::steady_clock::now();
    work();
    const double cpu = static_cast<double>(std::clock() - c0) / CLOCKS_PER_SEC;
    const double wall =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - w0).count();
    t.cpu = std::min(t.cpu, cpu);
    t.wall = std::min(t.wall, wall);
  }
  return t;
}

}  // namespace

int main(int argc, char** argv) {
  const int repeats = argc > 1 ? std::max(1, std::atoi(argv[1])) : 3;
  Scenario s;
  s.seed = 1;
  s.frames = 240;
  s.intervalMin = 10;
  s.groups.push_back(GroupSpec{"bench", 1, s.biology});
  const auto spec = positionsOf(s)[0];
  const auto dir = std::filesystem::temp_directory_path() / "budledger-bench-simulate";
  std::filesystem::create_directories(dir);

  PositionModel model = modelPosition(s, spec);
  std::printf("position: %d x %d px, %zu traps, %d frames, %.2f µm/px\n", model.device.width(),
              model.device.height(), model.device.traps().size(), s.frames, s.device.pixelUm);

  const Timing biology = best(repeats, [&] { model = modelPosition(s, spec); });
  const Timing render = best(
      repeats, [&] { renderPosition(s, model, [](int, const std::vector<std::uint16_t>&) {}); });
  auto written = [&](const char* compression) {
    return best(repeats, [&] {
      Scenario c = s;
      c.compression = compression;
      simulateExperiment(c, dir);
    });
  };
  const Timing plain = written("none");
  const auto plainBytes = std::filesystem::file_size(dir / "bench-p1.ome.tif");
  const Timing deflate = written("deflate");
  const auto deflateBytes = std::filesystem::file_size(dir / "bench-p1.ome.tif");
  std::filesystem::remove_all(dir);

  std::printf("%-34s %9s %9s %11s\n", "stage", "cpu s", "wall s", "frames/s");
  auto row = [&](const char* name, const Timing& t) {
    std::printf("%-34s %9.3f %9.3f %11.1f\n", name, t.cpu, t.wall, s.frames / t.cpu);
  };
  row("biology + truth", biology);
  row("render 240 frames", render);
  row("simulate, uncompressed TIFF", plain);
  row("simulate, deflate TIFF", deflate);
  std::printf("stack size: %.1f MB uncompressed, %.1f MB deflate\n", plainBytes / 1e6,
              deflateBytes / 1e6);
  return 0;
}
