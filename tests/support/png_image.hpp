#pragma once
// A PNG decoded to 8-bit RGB through libpng's simplified API, for checking figures.
#include <array>
#include <cstdint>
#include <string>
#include <vector>

namespace undertow::test {

struct RgbImage {
  int width = 0, height = 0;
  std::vector<std::uint8_t> rgb; // row-major, 3 bytes a pixel, top row first
  std::array<int, 3> at(int x, int y) const {
    const std::size_t i = 3 * (std::size_t(y) * std::size_t(width) + std::size_t(x));
    return {rgb[i], rgb[i + 1], rgb[i + 2]};
  }
};

// Throws std::runtime_error when the file is not a PNG libpng can decode.
RgbImage read_png(const std::string& path);

} // namespace undertow::test
