#pragma once
// Small plane-geometry helpers shared by the device, cell and optics code.
namespace budledger::demo {

struct Vec2 {
  double x = 0.0;
  double y = 0.0;
};
inline Vec2 operator+(Vec2 a, Vec2 b) { return {a.x + b.x, a.y + b.y}; }
inline Vec2 operator-(Vec2 a, Vec2 b) { return {a.x - b.x, a.y - b.y}; }
inline Vec2 operator*(double k, Vec2 a) { return {k * a.x, k * a.y}; }
inline double dot(Vec2 a, Vec2 b) { return a.x * b.x + a.y * b.y; }

}  // namespace budledger::demo
