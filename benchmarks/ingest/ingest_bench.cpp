// bench_ingest [WORKDIR] — the ingest figures of docs/performance.md, all
// measured in one run on this machine so they compare as ratios:
//  1. throughput: decoding every frame of a simulated 240-frame stack (one
//     thread, and through the read-ahead FrameStream) against a raw
//     sequential read() of the same file from the page cache;
//  2. registration frames/s on 2048x2048 16-bit frames on one core
//     (OpenCV's own threads off), sub-pixel shifts applied by the benchmark;
//  3. peak memory (ru_maxrss of a child process running the whole ingest)
//     for the same position at 100 and at 400 frames;
//  4. the whole ingest (survey, registration, traps, digests) of the
//     240-frame, 42-trap position on the machine's cores.
// A child mode, `bench_ingest --child STACK`, runs one ingest and exits.
#include <fcntl.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <opencv2/core/utility.hpp>
#include <opencv2/imgproc.hpp>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <thread>
#include <vector>

#include "core/io/frame_source.h"
#include "core/io/frame_stream.h"
#include "core/pipeline/analyze.h"
#include "core/register/registrar.h"
#include "core/traps/lattice.h"
#include "core/traps/structure_map.h"
#include "demo/scenario.h"
#include "demo/simulator.h"
#include "tests/core/common/synthetic_scene.h"
#include "tests/core/common/tiff_writer.h"

namespace fs = std::filesystem;
using namespace budledger;

namespace {

using Clock = std::chrono::steady_clock;
double seconds(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}
double processCpu() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return static_cast<double>(u.ru_utime.tv_sec + u.ru_stime.tv_sec) +
         1e-6 * static_cast<double>(u.ru_utime.tv_usec + u.ru_stime.tv_usec);
}
double cpuSeconds() {
  timespec ts{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
  return static_cast<double>(ts.tv_sec) + 1e-9 * static_cast<double>(ts.tv_nsec);
}

// The default scenario's position (6x7 traps, 0.25 um/px) with `frames` frames.
fs::path simulate(const fs::path& dir, int frames) {
  const std::string json = R"({"name": "bench", "seed": 42, "frames": )" + std::to_string(frames) +
                           R"(, "groups": [{"name": "bench", "positions": 1}]})";
  const demo::Scenario s = demo::scenarioFromJsonText(json, "bench");
  demo::simulateExperiment(s, dir);
  for (const auto& e : fs::directory_iterator(dir))
    if (e.path().extension() == ".tif") return e.path();
  throw std::runtime_error("simulator wrote no stack");
}

double rawReadMBps(const fs::path& file, int repeats) {
  std::vector<char> buf(4 << 20);
  double best = 1e300;
  for (int r = 0; r < repeats; ++r) {
    const int fd = ::open(file.c_str(), O_RDONLY);
    const auto t0 = Clock::now();
    while (::read(fd, buf.data(), buf.size()) > 0) {
    }
    best = std::min(best, seconds(t0));
    ::close(fd);
  }
  return static_cast<double>(fs::file_size(file)) / 1e6 / best;
}

double decodeMBps(const fs::path& file, int repeats, bool stream) {
  auto source = io::openStack(file);
  const double bytes = static_cast<double>(fs::file_size(file));
  double best = 1e300;
  cv::Mat frame;
  for (int r = 0; r < repeats; ++r) {
    const auto t0 = Clock::now();
    if (stream) {
      io::FrameStream s(*source);
      while (s.next()) {
      }
    } else {
      for (int k = 0; k < source->info().frames; ++k) source->read(k, frame);
    }
    best = std::min(best, seconds(t0));
  }
  return bytes / 1e6 / best;
}

void registrationFps() {
  cv::setNumThreads(1);
  testing::SceneOptions o;
  o.size = {2048, 2048};
  o.cellsInTraps = 400;
  o.freeCells = 60;
  const testing::SyntheticScene scene(o);
  const cv::Mat reference = scene.render({});
  const auto lattice = traps::findLattice({reference});
  registration::RegistrationOptions ro;
  ro.searchRadius = 0.45 * lattice->minPitch();
  ro.latticeA = lattice->a;
  ro.latticeB = lattice->b;
  registration::Registrar registrar(reference, traps::structureMap(reference, *lattice), ro);
  std::vector<cv::Mat> frames;
  std::vector<cv::Point2d> shifts;
  cv::RNG rng(7);
  for (int k = 0; k < 8; ++k) {
    shifts.emplace_back(rng.uniform(-12.0, 12.0), rng.uniform(-12.0, 12.0));
    frames.push_back(scene.render({shifts.back(), rng.uniform(0.9, 1.1), 0, k}));
  }
  const int n = 400;
  double worst = 0;
  const double c0 = cpuSeconds();
  const auto t0 = Clock::now();
  for (int i = 0; i < n; ++i) {
    const auto m =
        registrar.measure(frames[static_cast<size_t>(i % 8)], shifts[static_cast<size_t>(i % 8)]);
    worst = std::max(worst, cv::norm(m.shift - shifts[static_cast<size_t>(i % 8)]));
  }
  const double wall = seconds(t0), cpu = cpuSeconds() - c0;
  std::printf(
      "| registration, 2048x2048 16-bit, one core | %.0f frames/s (CPU %.2f ms/frame, wall %.2f "
      "ms/frame) | max error %.3f px |\n",
      n / cpu, 1e3 * cpu / n, 1e3 * wall / n, worst);
  cv::setNumThreads(-1);
}

long childPeakKb(const char* self, const fs::path& stack) {
  const pid_t pid = fork();
  if (pid == 0) {
    execl(self, self, "--child", stack.c_str(), static_cast<char*>(nullptr));
    _exit(127);
  }
  int status = 0;
  rusage usage{};
  wait4(pid, &status, 0, &usage);
  if (!WIFEXITED(status) || WEXITSTATUS(status) != 0) return -1;
  return usage.ru_maxrss;  // kilobytes on Linux
}

int child(const char* stack) {
  auto source = io::openStack(stack);
  const auto a = pipeline::analyzeFrames(*source, {}, Progress{});
  return a.layout.traps.empty() ? 1 : 0;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc == 3 && std::string(argv[1]) == "--child") return child(argv[2]);
  const fs::path work =
      argc > 1 ? fs::path(argv[1]) : fs::temp_directory_path() / "budledger_bench_ingest";
  fs::remove_all(work);
  fs::create_directories(work);
  std::printf("machine: %u hardware threads\n\n| what | figure | note |\n|---|---|---|\n",
              std::thread::hardware_concurrency());

  // 1 and 4 on the simulated 240-frame position.
  const fs::path stack = simulate(work / "p240", 240);
  const double mb = static_cast<double>(fs::file_size(stack)) / 1e6;
  rawReadMBps(stack, 1);  // into the page cache
  const double raw = rawReadMBps(stack, 5);
  const double decode = decodeMBps(stack, 3, false);
  const double streamed = decodeMBps(stack, 3, true);
  std::printf("| raw sequential read() from page cache | %.0f MB/s | %.0f MB file |\n", raw, mb);
  std::printf("| ingest: decode every frame, one thread | %.0f MB/s | %.2fx raw |\n", decode,
              decode / raw);
  std::printf("| ingest: FrameStream (read-ahead thread) | %.0f MB/s | %.2fx raw |\n", streamed,
              streamed / raw);
  for (const char* codec : {"lzw", "zip"}) {
    const fs::path out = work / (std::string(codec) + ".tif");
    const std::string cmd =
        "tiffcp -c " + std::string(codec) + " " + stack.string() + " " + out.string();
    if (std::system(cmd.c_str()) != 0) continue;
    rawReadMBps(out, 1);
    const double d = decodeMBps(out, 2, false);
    std::printf(
        "| ingest: decode %s (tiffcp -c %s), one thread | %.0f MB/s of pixels | %.0f MB file |\n",
        codec, codec, d * mb / (static_cast<double>(fs::file_size(out)) / 1e6),
        static_cast<double>(fs::file_size(out)) / 1e6);
  }
  {
    auto source = io::openStack(stack);
    double best = 1e300, bestNoDigest = 1e300, mainCpu = 1e300, allCpu = 1e300;
    pipeline::PositionAnalysis a;
    const char* threads = std::getenv("BENCH_CV_THREADS");
    cv::setNumThreads(threads ? std::atoi(threads) : 1);  // as budledger-cli analyze does
    for (int r = 0; r < 3; ++r) {
      const auto t0 = Clock::now();
      const double c0 = cpuSeconds(), p0 = processCpu();
      a = pipeline::analyzeFrames(*source, {}, Progress{});
      best = std::min(best, seconds(t0));
      mainCpu = std::min(mainCpu, cpuSeconds() - c0);
      allCpu = std::min(allCpu, processCpu() - p0);
      pipeline::AnalyzeOptions noDigest;
      noDigest.digests = false;
      const auto t1 = Clock::now();
      pipeline::analyzeFrames(*source, noDigest, Progress{});
      bestNoDigest = std::min(bestNoDigest, seconds(t1));
    }
    std::printf(
        "| whole ingest of 240 frames %dx%d, %zu traps (survey, registration, traps, SHA-256) | "
        "%.2f s wall | CPU: %.2f s main thread, %.2f s all threads; %.2f s wall without the digest "
        "|\n",
        a.info.width, a.info.height, a.layout.traps.size(), best, mainCpu, allCpu, bestNoDigest);
  }
  cv::setNumThreads(-1);
  if (std::getenv("BENCH_SKIP_REST")) return 0;
  registrationFps();
  // 3: the same position at 100 and 400 frames.
  const fs::path s100 = simulate(work / "p100", 100);
  const fs::path s400 = simulate(work / "p400", 400);
  const long kb100 = childPeakKb(argv[0], s100), kb400 = childPeakKb(argv[0], s400);
  std::printf("| peak memory, whole ingest, 100 frames | %.1f MB | stack %.0f MB |\n",
              kb100 / 1024.0, static_cast<double>(fs::file_size(s100)) / 1e6);
  std::printf("| peak memory, whole ingest, 400 frames | %.1f MB | stack %.0f MB; ratio %.2f |\n",
              kb400 / 1024.0, static_cast<double>(fs::file_size(s400)) / 1e6,
              static_cast<double>(kb400) / static_cast<double>(kb100));
  fs::remove_all(work);
  return 0;
}
