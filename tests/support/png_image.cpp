#include "support/png_image.hpp"

#include <png.h>

#include <stdexcept>

namespace undertow::test {

RgbImage read_png(const std::string& path) {
  png_image img{};
  img.version = PNG_IMAGE_VERSION;
  if (!png_image_begin_read_from_file(&img, path.c_str()))
    throw std::runtime_error(path + ": " + img.message);
  img.format = PNG_FORMAT_RGB;
  RgbImage out;
  out.width = int(img.width), out.height = int(img.height);
  out.rgb.resize(PNG_IMAGE_SIZE(img));
  if (!png_image_finish_read(&img, nullptr, out.rgb.data(), 0, nullptr)) {
    png_image_free(&img);
    throw std::runtime_error(path + ": " + img.message);
  }
  return out;
}

} // namespace undertow::test
