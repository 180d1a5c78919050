// ProjectCropSource on a real analysed project: the simulator writes a tiny
// experiment, core/pipeline analyses it into a project, and the crops the
// workstation shows must be exactly core/traps' registered crops of the
// frames the project's inputs hold — for every trap and frame, from several
// threads at once. A project whose images moved opens with a clear message.
#include <QTemporaryDir>
#include <QtConcurrent>
#include <QtTest>
#include <filesystem>

#include "core/io/frame_source.h"
#include "core/pipeline/analyze.h"
#include "core/traps/crops.h"
#include "demo/scenario.h"
#include "demo/simulator.h"
#include "ui/project_crop_source.h"

using namespace budledger;

class ProjectCropSourceTest : public QObject {
  Q_OBJECT

 private slots:
  void initTestCase() {
    QVERIFY(dir_.isValid());
    const std::filesystem::path root = dir_.path().toStdString();
    const auto scenario = demo::loadScenario(std::filesystem::path(BUDLEDGER_SOURCE_DIR) /
                                             "demo/scenarios/tiny.json");
    demo::simulateExperiment(scenario, root / "images");
    project_ = QString::fromStdString((root / "tiny.budledger").string());
    auto project = store::Project::create(project_.toStdString());
    for (const auto& entry : std::filesystem::directory_iterator(root / "images")) {
      if (entry.path().extension() != ".tif") continue;
      auto source = io::openStack(entry.path());
      pipeline::AnalyzeOptions options;
      options.digests = false;
      pipeline::analyzePosition(project, *source, options, {});
    }
  }

  void cropsAreCoresRegisteredCrops() {
    auto project = store::Project::open(project_.toStdString(), store::Database::Access::ReadOnly);
    auto src = ui::ProjectCropSource::open(project);
    for (const auto& pos : project.positions()) {
      const cv::Rect stored = ui::ProjectCropSource::cropBoxFor(project, pos);
      QVERIFY(src->cropSize().width() >= stored.width);
      auto frames = io::openStack(project.inputs().at(static_cast<size_t>(pos.id - 1)).path);
      const auto drift = project.drift(pos.id);
      for (const auto& t : project.traps(pos.id)) {
        for (int f : {0, pos.frameCount / 2, pos.frameCount - 1}) {
          const QImage img = src->crop({pos.id, t.trap}, f);
          QVERIFY2(!img.isNull(),
                   qPrintable(QStringLiteral("trap %1 frame %2").arg(t.trap).arg(f)));
          QCOMPARE(img.size(), src->cropSize());
          cv::Mat expect;
          const cv::Rect box(-src->cropSize().width() / 2, -src->cropSize().height() / 2,
                             src->cropSize().width(), src->cropSize().height());
          traps::cropAt(frames->read(f), {t.x, t.y},
                        {drift[static_cast<size_t>(f)].dx, drift[static_cast<size_t>(f)].dy}, box,
                        traps::CropSampling::Linear, expect);
          const cv::Mat got = src->cropMat({pos.id, t.trap}, f);
          QCOMPARE(cv::norm(got, expect, cv::NORM_INF), 0.0);
        }
      }
    }
  }

  void everyCropFromSeveralThreads() {
    auto project = store::Project::open(project_.toStdString(), store::Database::Access::ReadOnly);
    auto src = ui::ProjectCropSource::open(project, {std::size_t{4} << 20});  // a small frame cache
    std::vector<std::pair<ui::TrapId, int>> all;
    for (const auto& pos : project.positions())
      for (const auto& t : project.traps(pos.id))
        for (int f = 0; f < pos.frameCount; ++f) all.push_back({{pos.id, t.trap}, f});
    std::atomic<int> bad{0};
    QtConcurrent::blockingMap(all, [&](const std::pair<ui::TrapId, int>& job) {
      if (src->crop(job.first, job.second).isNull()) ++bad;
    });
    QCOMPARE(bad.load(), 0);
    QVERIFY(src->crop({1, 999}, 0).isNull());    // no such trap
    QVERIFY(src->crop({1, 0}, 10000).isNull());  // no such frame
  }

  void missingImagesAreNamed() {
    const QString copy = dir_.filePath(QStringLiteral("moved.budledger"));
    QFile::copy(project_, copy);
    {
      auto project = store::Project::open(copy.toStdString());
      project.db().exec("UPDATE inputs SET path = path || '.gone'");
    }
    auto project = store::Project::open(copy.toStdString(), store::Database::Access::ReadOnly);
    try {
      ui::ProjectCropSource::open(project);
      QFAIL("opened a project whose images are gone");
    } catch (const InputError& e) {
      QVERIFY(QString::fromStdString(e.what()).contains(QStringLiteral("missing")));
      QVERIFY(QString::fromStdString(e.file()).endsWith(QStringLiteral(".gone")));
    }
  }

 private:
  QTemporaryDir dir_;
  QString project_;
};

QTEST_MAIN(ProjectCropSourceTest)
#include "project_crop_source_test.moc"
