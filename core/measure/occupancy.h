#pragma once
// OccupancyModel: class probabilities empty | single | budded | crowded for
// one trap-frame. Empty, single and budded come from a multinomial logistic
// regression on FrameFeatures, trained on simulated trap-frames whose class
// is known from the simulator's truth (tools/train_occupancy, model file
// core/measure/occupancy_model.json); logistic regression's probabilities are
// calibrated by construction of its likelihood, and the training program
// reports their reliability. Crowded has no truth to learn from: it is a
// documented rule (two or more cells other than the bud within one mother
// radius of her), mixed in with a fixed confidence.
//
// Invariants: probabilities are in [0, 1] and sum to 1; a model always has
// kFeatureCount inputs.
#include <array>
#include <string>
#include <vector>

#include "core/measure/features.h"

namespace budledger::measure {

using ClassProbabilities = std::array<double, 4>;  // empty, single, budded, crowded

struct TrainingExample {
  FeatureVector x;
  int label = 0;  // 0 empty, 1 single, 2 budded
};

struct TrainOptions {
  double l2 = 1e-3;
  int iterations = 300;  // Newton-free gradient steps with a fixed schedule: deterministic
};

class OccupancyModel {
 public:
  // The model shipped with BudLedger (compiled in from occupancy_model.json).
  static OccupancyModel builtIn();
  static OccupancyModel fromJson(const std::string& text);
  static OccupancyModel train(const std::vector<TrainingExample>& data, const TrainOptions& o);
  std::string toJson() const;

  ClassProbabilities predict(const FrameFeatures& f) const;
  std::array<double, 3> predictThree(const FeatureVector& x) const;

  const std::vector<double>& weights() const { return w_; }

 private:
  std::array<double, kFeatureCount> mean_{}, scale_{};
  std::vector<double> w_;  // 3 x (kFeatureCount + 1), class-major, bias last
};

}  // namespace budledger::measure
