#pragma once
// What every per-particle kernel needs: forced inlining into the vectorised batch loops, and
// declarations that let GCC call glibc's vector math library (libmvec) from those loops without
// -ffast-math. libmvec is accurate to a few ulp (glibc manual, "Errors in Math Functions").

#include <cmath>
#include <cstdio>
#include <stdexcept>
#include <string>

#if defined(__GNUC__) && !defined(__clang__)
#define UNDERTOW_INLINE inline __attribute__((always_inline))
#else
#define UNDERTOW_INLINE inline
#endif

// A vectorised loop compiled for baseline x86-64 and x86-64-v3 (AVX2, FMA); the widest the CPU
// supports is picked at load time, so one binary runs on any x86-64 node and still uses wide
// vectors. An AVX-512 variant (x86-64-v4) only with the CMake option UNDERTOW_AVX512: it is
// faster where the CPU has it, but its vector maths (libmvec's AVX-512 functions) rounds
// differently in the last bits, so results would differ between AVX2 and AVX-512 nodes of one
// cluster and from the committed demo data; by default every AVX2 machine gives the same bits.
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__) && defined(UNDERTOW_AVX512)
#define UNDERTOW_CLONES                                                                            \
  __attribute__((target_clones("default", "arch=x86-64-v3", "arch=x86-64-v4")))
#elif defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#define UNDERTOW_CLONES __attribute__((target_clones("default", "arch=x86-64-v3")))
#else
#define UNDERTOW_CLONES
#endif

#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__) && !defined(__FAST_MATH__)
// glibc declares these with a SIMD attribute only under -ffast-math; we declare them so the
// OpenMP simd loops in src/potential/batch.cpp map them to _ZGV*_ variants of libmvec.
extern "C" {
__attribute__((simd("notinbranch"))) double exp(double) noexcept;
__attribute__((simd("notinbranch"))) double expm1(double) noexcept;
__attribute__((simd("notinbranch"))) double log(double) noexcept;
__attribute__((simd("notinbranch"))) double log1p(double) noexcept;
__attribute__((simd("notinbranch"))) double sin(double) noexcept;
__attribute__((simd("notinbranch"))) double cos(double) noexcept;
__attribute__((simd("notinbranch"))) double atan(double) noexcept;
__attribute__((simd("notinbranch"))) double atan2(double, double) noexcept;
__attribute__((simd("notinbranch"))) double pow(double, double) noexcept;
}
#endif

namespace undertow::detail {

// Added to R^2 or r^2 so that 0/0 at the exact centre becomes 0 and any physical radius is
// unchanged in double precision.
inline constexpr double tiny2 = 1e-300;

// max(v, lo) that vectorises on every x86-64 level (std::fmax must honour NaN rules).
UNDERTOW_INLINE double at_least(double v, double lo) {
  return v > lo ? v : lo;
}

// Parameter checks shared by all components; the message names the key so the model-file
// reader can add file and line.
struct ParameterError : std::invalid_argument {
  std::string key;
  ParameterError(std::string k, const std::string& msg)
      : std::invalid_argument(msg), key(std::move(k)) {}
};

inline std::string num(double v) {
  char b[32];
  std::snprintf(b, sizeof b, "%.6g", v);
  return b;
}

inline double positive(double v, const char* key) {
  if (!(std::isfinite(v) && v > 0))
    throw ParameterError(key, "must be positive and finite, got " + num(v));
  return v;
}
inline double non_negative(double v, const char* key) {
  if (!(std::isfinite(v) && v >= 0))
    throw ParameterError(key, "must be zero or positive and finite, got " + num(v));
  return v;
}
inline double finite(double v, const char* key) {
  if (!std::isfinite(v)) throw ParameterError(key, "must be finite, got " + num(v));
  return v;
}

} // namespace undertow::detail

namespace undertow::detail {
// The variant of the vectorised loops this machine runs: "x86-64-v4 (AVX-512)", "x86-64-v3
// (AVX2)" or "x86-64 (SSE2)" (results are bit-identical between machines that run the same one).
inline const char* vector_kernels() {
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#if defined(UNDERTOW_AVX512)
  if (__builtin_cpu_supports("x86-64-v4")) return "x86-64-v4 (AVX-512)";
#endif
  if (__builtin_cpu_supports("x86-64-v3")) return "x86-64-v3 (AVX2)";
  return "x86-64 (SSE2)";
#else
  return "not multiversioned (compiler without target_clones)";
#endif
}
} // namespace undertow::detail
