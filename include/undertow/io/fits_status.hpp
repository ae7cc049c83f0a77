#pragma once
// A CFITSIO status code as text, with CFITSIO's message stack cleared: for the FITS table reader
// and writer's error messages.
#include <fitsio.h>
#include <string>

namespace undertow::io {

inline std::string fits_status_text(int status) {
  char text[FLEN_STATUS];
  fits_get_errstatus(status, text);
  fits_clear_errmsg();
  return text;
}

} // namespace undertow::io
