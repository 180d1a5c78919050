// budledger-test-stack OUT.tif [FRAMES [WIDTH HEIGHT]]: writes a synthetic
// OME-TIFF trap-array stack with drift for the end-to-end tests.
#include <cstdlib>
#include <exception>
#include <iostream>

#include "tests/core/common/synthetic_scene.h"
#include "tests/core/common/tiff_writer.h"

int main(int argc, char** argv) {
  using namespace budledger::testing;
  if (argc < 2) {
    std::cerr << "usage: budledger-test-stack OUT.tif [FRAMES [WIDTH HEIGHT]]\n";
    return 2;
  }
  try {
    const int frames = argc > 2 ? std::atoi(argv[2]) : 12;
    SceneOptions o;
    if (argc > 4) o.size = cv::Size(std::atoi(argv[3]), std::atoi(argv[4]));
    const SyntheticScene scene(o);
    const auto drift = makeDrift(frames, 6.0, 3);
    std::vector<cv::Mat> stack;
    for (int t = 0; t < frames; ++t) stack.push_back(scene.render({drift[t], 1.0, 0.0, t}));
    TiffWriteOptions w;
    w.description = omeXml(o.size.width, o.size.height, frames, 16, 10.0, 0.25);
    writeTiffStack(argv[1], stack, w);
    return 0;
  } catch (const std::exception& e) {
    std::cerr << "budledger-test-stack: " << e.what() << "\n";
    return 1;
  }
}
