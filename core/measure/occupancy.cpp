#include "core/measure/occupancy.h"

#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>
#include <stdexcept>

#include "core/measure/occupancy_model.inc"

namespace budledger::measure {
namespace {

constexpr int kClasses = 3;
constexpr int kStride = kFeatureCount + 1;

void softmax(std::array<double, 3>& z) {
  const double mx = std::max({z[0], z[1], z[2]});
  double s = 0;
  for (double& v : z) {
    v = std::exp(v - mx);
    s += v;
  }
  for (double& v : z) v /= s;
}

}  // namespace

OccupancyModel OccupancyModel::builtIn() { return fromJson(kOccupancyModelJson); }

OccupancyModel OccupancyModel::fromJson(const std::string& text) {
  const auto j = nlohmann::json::parse(text);
  OccupancyModel m;
  const auto& features = j.at("features");
  if (features.size() != kFeatureCount)
    throw std::runtime_error("occupancy model: wrong number of features");
  for (int i = 0; i < kFeatureCount; ++i) {
    m.mean_[static_cast<std::size_t>(i)] = features[static_cast<std::size_t>(i)].at("mean");
    m.scale_[static_cast<std::size_t>(i)] = features[static_cast<std::size_t>(i)].at("scale");
  }
  m.w_ = j.at("weights").get<std::vector<double>>();
  if (m.w_.size() != static_cast<std::size_t>(kClasses * kStride))
    throw std::runtime_error("occupancy model: wrong number of weights");
  return m;
}

std::string OccupancyModel::toJson() const {
  nlohmann::json j;
  j["model"] = "multinomial logistic regression";
  j["classes"] = {"empty", "single", "budded"};
  for (int i = 0; i < kFeatureCount; ++i)
    j["features"].push_back({{"name", std::string(featureName(i))},
                             {"mean", mean_[static_cast<std::size_t>(i)]},
                             {"scale", scale_[static_cast<std::size_t>(i)]}});
  j["weights"] = w_;
  return j.dump(1);
}

std::array<double, 3> OccupancyModel::predictThree(const FeatureVector& x) const {
  std::array<double, 3> z{};
  for (int c = 0; c < kClasses; ++c) {
    const double* w = &w_[static_cast<std::size_t>(c * kStride)];
    double s = w[kFeatureCount];
    for (int i = 0; i < kFeatureCount; ++i)
      s += w[i] * (x[static_cast<std::size_t>(i)] - mean_[static_cast<std::size_t>(i)]) /
           scale_[static_cast<std::size_t>(i)];
    z[static_cast<std::size_t>(c)] = s;
  }
  softmax(z);
  return z;
}

ClassProbabilities OccupancyModel::predict(const FrameFeatures& f) const {
  const auto three = predictThree(f.x);
  // Documented rule for crowding (no truth to learn it from).
  const double crowded = f.nearOthers >= 2 ? 0.85 : f.nearOthers == 1 ? 0.2 : 0.02;
  return {three[0] * (1 - crowded), three[1] * (1 - crowded), three[2] * (1 - crowded), crowded};
}

OccupancyModel OccupancyModel::train(const std::vector<TrainingExample>& data,
                                     const TrainOptions& o) {
  OccupancyModel m;
  const double n = static_cast<double>(std::max<std::size_t>(1, data.size()));
  for (int i = 0; i < kFeatureCount; ++i) {
    double s = 0, s2 = 0;
    for (const auto& e : data) {
      s += e.x[static_cast<std::size_t>(i)];
      s2 += e.x[static_cast<std::size_t>(i)] * e.x[static_cast<std::size_t>(i)];
    }
    const double mean = s / n;
    m.mean_[static_cast<std::size_t>(i)] = mean;
    m.scale_[static_cast<std::size_t>(i)] =
        std::max(1e-6, std::sqrt(std::max(0.0, s2 / n - mean * mean)));
  }
  m.w_.assign(static_cast<std::size_t>(kClasses * kStride), 0.0);
  // Full-batch gradient descent with momentum on the mean negative log-likelihood plus
  // L2: no randomness, so the same data always give the same model.
  std::vector<double> velocity(m.w_.size(), 0.0), grad(m.w_.size());
  std::vector<std::array<double, kFeatureCount>> z(data.size());
  for (std::size_t k = 0; k < data.size(); ++k)
    for (int i = 0; i < kFeatureCount; ++i)
      z[k][static_cast<std::size_t>(i)] =
          (data[k].x[static_cast<std::size_t>(i)] - m.mean_[static_cast<std::size_t>(i)]) /
          m.scale_[static_cast<std::size_t>(i)];
  const double rate = 0.5, momentum = 0.9;
  for (int it = 0; it < o.iterations; ++it) {
    std::fill(grad.begin(), grad.end(), 0.0);
    for (std::size_t k = 0; k < data.size(); ++k) {
      std::array<double, 3> p{};
      for (int c = 0; c < kClasses; ++c) {
        const double* w = &m.w_[static_cast<std::size_t>(c * kStride)];
        double s = w[kFeatureCount];
        for (int i = 0; i < kFeatureCount; ++i) s += w[i] * z[k][static_cast<std::size_t>(i)];
        p[static_cast<std::size_t>(c)] = s;
      }
      softmax(p);
      for (int c = 0; c < kClasses; ++c) {
        const double g = p[static_cast<std::size_t>(c)] - (data[k].label == c ? 1.0 : 0.0);
        double* gw = &grad[static_cast<std::size_t>(c * kStride)];
        for (int i = 0; i < kFeatureCount; ++i) gw[i] += g * z[k][static_cast<std::size_t>(i)];
        gw[kFeatureCount] += g;
      }
    }
    for (std::size_t i = 0; i < m.w_.size(); ++i) {
      const bool bias = (i + 1) % kStride == 0;
      const double g = grad[i] / n + (bias ? 0.0 : o.l2 * m.w_[i]);
      velocity[i] = momentum * velocity[i] - rate * g;
      m.w_[i] += velocity[i];
    }
  }
  return m;
}

}  // namespace budledger::measure
