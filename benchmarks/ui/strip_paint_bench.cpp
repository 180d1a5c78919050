// bench_ui_strips: how long the time strips take to paint while scrolling.
// One position of 42 traps x 240 frames (the demo's lattice), the real
// MainWindow at 1920x1080 on the offscreen platform, synthetic crops from
// test support. For each zoom (full crops, half crops, whole movie as
// kymograph) it scrolls across the movie and down the lanes, timing a
// synchronous repaint of the strip view (viewport, axis, lane labels) per
// step, first with a cold thumbnail cache (placeholders while crops load)
// and then warm. Prints median / 95th percentile / max in ms. Then it edits:
// on every lane an accept, a move, a reject, an undo and a redo through the
// window's commands (what the keys run), timing each from the command to the
// Kaplan–Meier curves recomputed and to the window's pending paints done.
#include <QApplication>
#include <QElapsedTimer>
#include <QScrollBar>
#include <QSettings>
#include <QTemporaryDir>
#include <QThread>
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <ctime>
#include <vector>

#include "demo_project.h"
#include "synthetic_crops.h"
#include "ui/key_map.h"
#include "ui/main_window.h"
#include "ui/results_panel.h"
#include "ui/review_queue_panel.h"
#include "ui/survival_model.h"
#include "ui/survival_plot.h"
#include "ui/time_strip_view.h"
#include "ui/trap_image_view.h"
#include "ui/trap_list_panel.h"

using namespace budledger;

namespace {

struct Stats {
  double median = 0, p95 = 0, max = 0;
  int n = 0;
};

Stats summarise(std::vector<double> ms) {
  Stats s;
  if (ms.empty()) return s;
  std::sort(ms.begin(), ms.end());
  s.n = static_cast<int>(ms.size());
  s.median = ms[ms.size() / 2];
  s.p95 = ms[std::min(ms.size() - 1, ms.size() * 95 / 100)];
  s.max = ms.back();
  return s;
}

// CPU time of the calling (UI) thread: unlike wall time it does not grow when
// other programs share the machine's two cores.
double threadCpuMs() {
  timespec ts{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
  return ts.tv_sec * 1e3 + ts.tv_nsec / 1e6;
}

struct Samples {
  std::vector<double> wall, cpu;
};

enum class Paint {
  Scroll,  // scroll bar moved: blit and paint the exposed band, as the event loop does
  Full,    // everything repainted (cursor jump, zoom, edit)
};

// Scrolls right across the whole movie in steps of `step` px, then down the lanes.
Samples scrollAndTime(QWidget* window, ui::TimeStripView* s, int step, Paint mode) {
  Samples out;
  auto* h = s->horizontalScrollBar();
  auto* v = s->verticalScrollBar();
  auto measure = [&](QScrollBar* bar, int value) {
    QElapsedTimer t;
    const double c0 = threadCpuMs();
    t.start();
    bar->setValue(value);
    if (mode == Paint::Full)
      s->repaint();
    else
      QCoreApplication::sendPostedEvents(window, QEvent::UpdateRequest);
    out.wall.push_back(t.nsecsElapsed() / 1e6);
    out.cpu.push_back(threadCpuMs() - c0);
    QApplication::processEvents();  // deliver finished thumbnails, as the event loop would
  };
  h->setValue(0);
  v->setValue(0);
  QApplication::processEvents();
  for (int x = step; x <= h->maximum(); x += step) measure(h, x);
  for (int y = step; y <= v->maximum(); y += step) measure(v, y);
  return out;
}

// Edit-to-updated-curve latency: from the command (what the key runs) to the
// SurvivalModel's changed() (curves recomputed) and to every paint the edit
// asked for delivered (strips, results panel, survival plot).
void timeEdits(ui::MainWindow& w) {
  ui::TimeStripView* s = w.strips();
  s->setPixelsPerFrame(48.0);
  Samples toCurve, toPaint, toReturn;
  double curveAt = 0;
  QElapsedTimer t;
  QObject::connect(w.survival(), &ui::SurvivalModel::changed, &w,
                   [&] { curveAt = t.nsecsElapsed() / 1e6; });
  auto timed = [&](ui::Command c) {
    QApplication::processEvents();
    curveAt = -1;
    const double c0 = threadCpuMs();
    t.start();
    w.run(c);
    const double returned = t.nsecsElapsed() / 1e6;
    QCoreApplication::sendPostedEvents(&w, QEvent::UpdateRequest);
    const double wall = t.nsecsElapsed() / 1e6;
    if (curveAt < 0) return;  // the command changed nothing (e.g. refused)
    toCurve.wall.push_back(curveAt);
    toReturn.wall.push_back(returned);
    toPaint.wall.push_back(wall);
    toPaint.cpu.push_back(threadCpuMs() - c0);
  };
  const int lanes = static_cast<int>(s->lanes().size());
  for (int lane = 0; lane < lanes; ++lane) {
    const auto& events = w.session()->events(s->lanes()[static_cast<size_t>(lane)]);
    const auto it = std::find_if(events.begin(), events.end(), [](const ui::ReviewEvent& e) {
      return e.decision == ui::Decision::Proposed;
    });
    if (it == events.end()) continue;
    s->setCursor(lane, it->event.frame);
    for (ui::Command c : {ui::Command::Accept, ui::Command::MoveLater, ui::Command::Reject,
                          ui::Command::Undo, ui::Command::Redo})
      timed(c);
  }
  // Where a whole-window repaint after an edit goes, widget by widget.
  struct Part {
    const char* name;
    QWidget* widget;
  };
  const Part parts[] = {{"strips", s},
                        {"trap list", w.trapPanel()},
                        {"review queue", w.queuePanel()},
                        {"current trap", w.trapImage()},
                        {"results", w.resultsPanel()},
                        {"survival plot", w.survivalPlot()},
                        {"whole window", &w}};
  std::printf("  repaint after an edit, by widget (UI-thread CPU ms, median of 20):");
  for (const Part& part : parts) {
    std::vector<double> ms;
    for (int i = 0; i < 20; ++i) {
      const double c0 = threadCpuMs();
      part.widget->repaint();
      ms.push_back(threadCpuMs() - c0);
    }
    std::printf(" %s %.2f;", part.name, summarise(ms).median);
  }
  std::printf("\n");
  const Stats back = summarise(toReturn.wall);
  const Stats curve = summarise(toCurve.wall), paint = summarise(toPaint.wall),
              cpu = summarise(toPaint.cpu);
  std::printf("edits: %d (accept, move, reject, undo, redo on each lane)\n", paint.n);
  std::printf("  command -> curves recomputed, wall ms: median %.2f p95 %.2f max %.2f\n",
              curve.median, curve.p95, curve.max);
  std::printf("  command returned (journal, every model updated), wall ms: median %.2f p95 %.2f\n",
              back.median, back.p95);
  std::printf("  command -> window repainted,  wall ms: median %.2f p95 %.2f max %.2f\n",
              paint.median, paint.p95, paint.max);
  std::printf("  command -> window repainted,  UI-thread CPU ms: median %.2f p95 %.2f\n",
              cpu.median, cpu.p95);
}

}  // namespace

int main(int argc, char** argv) {
  qputenv("QT_QPA_PLATFORM", "offscreen");
  QApplication app(argc, argv);
  QTemporaryDir tmp;
  const QString path = tmp.filePath(QStringLiteral("bench.budledger"));
  testsupport::DemoOptions demo;
  demo.positions = 1;
  demo.rows = 6;
  demo.cols = 7;
  demo.frames = 240;
  const auto events = testsupport::writeDemoProject(path, demo);
  auto crops = std::make_shared<testsupport::SyntheticCrops>(events);

  QSettings settings(tmp.filePath(QStringLiteral("s.ini")), QSettings::IniFormat);
  // Edits are signed: a reviewer is set up as the editing tests do.
  settings.setValue(QStringLiteral("identity/name"), QStringLiteral("Bench Reviewer"));
  settings.setValue(QStringLiteral("identity/role"), QStringLiteral("technician"));
  ui::MainWindowOptions options;
  options.cropSources = [crops](ui::ReviewSession&) { return crops; };
  options.thumbnails.cacheBytes = 512LL << 20;
  ui::MainWindow w(settings, options);
  w.resize(1920, 1080);
  w.show();
  QApplication::processEvents();
  if (auto err = w.openProject(path, true)) {
    std::fprintf(stderr, "cannot open: %s\n", err->toLocal8Bit().constData());
    return 1;
  }
  ui::TimeStripView* s = w.strips();
  double load[1] = {0};
  getloadavg(load, 1);
  std::printf("load average at start %.1f on %d cores\n", load[0], QThread::idealThreadCount());
  std::printf("window 1920x1080, strip viewport %dx%d, %zu lanes x %d frames\n",
              s->viewport()->width(), s->viewport()->height(), s->lanes().size(),
              s->axis().frameCount());
  std::printf("%-26s %-6s %-6s %6s | %-22s | %-22s\n", "zoom", "paint", "cache", "steps",
              "wall ms: median p95 max", "UI-thread CPU ms: med p95");
  struct Zoom {
    const char* name;
    double ppf;
  };
  const Zoom zooms[] = {{"full crops (48 px/frame)", 48.0},
                        {"half crops (24 px/frame)", 24.0},
                        {"whole movie (kymograph)", 0.0}};
  // --edits-only skips the scrolling passes (for profiling the edit path).
  const bool editsOnly = argc > 1 && std::strcmp(argv[1], "--edits-only") == 0;
  for (const Zoom& z : zooms) {
    if (editsOnly) break;
    if (z.ppf > 0)
      s->setPixelsPerFrame(z.ppf);
    else
      s->zoomToFit();
    for (Paint mode : {Paint::Scroll, Paint::Full}) {
      w.loader()->clear();
      for (const char* phase : {"cold", "warm"}) {
        const Samples sm = scrollAndTime(&w, s, 24, mode);
        const Stats wall = summarise(sm.wall), cpu = summarise(sm.cpu);
        std::printf("%-26s %-6s %-6s %6d | %6.2f %6.2f %7.2f | %6.2f %6.2f\n", z.name,
                    mode == Paint::Scroll ? "scroll" : "full", phase, wall.n, wall.median, wall.p95,
                    wall.max, cpu.median, cpu.p95);
        // Warm: every thumbnail the pass asked for is in the cache.
        w.loader()->waitForIdle();
        scrollAndTime(&w, s, 24, Paint::Full);
        w.loader()->waitForIdle();
      }
    }
  }
  timeEdits(w);
  std::printf("thumbnail cache after the runs: %d images, %.1f MiB (cap %.0f MiB)\n",
              w.loader()->cache().count(), w.loader()->cache().bytes() / 1048576.0,
              w.loader()->cache().cap() / 1048576.0);
  return 0;
}
