// Prints what the figure checks need to know of a PNG: "WIDTH HEIGHT DISTINCT_COLOURS
// INK_FRACTION", the ink fraction being the share of pixels that are not the page's white.
// Usage: png_probe FILE.png
#include <cstdio>
#include <exception>
#include <set>

#include "support/png_image.hpp"

int main(int argc, char** argv) {
  if (argc != 2) {
    std::fprintf(stderr, "usage: png_probe FILE.png\n");
    return 2;
  }
  try {
    const auto img = undertow::test::read_png(argv[1]);
    std::set<int> colours;
    std::size_t ink = 0;
    for (std::size_t i = 0; i + 2 < img.rgb.size(); i += 3) {
      const int c = img.rgb[i] << 16 | img.rgb[i + 1] << 8 | img.rgb[i + 2];
      colours.insert(c);
      if (c != 0xFFFFFF) ++ink;
    }
    std::printf("%d %d %zu %.6f\n", img.width, img.height, colours.size(),
                double(ink) / double(img.rgb.size() / 3));
  } catch (const std::exception& e) {
    std::fprintf(stderr, "png_probe: %s\n", e.what());
    return 1;
  }
  return 0;
}
