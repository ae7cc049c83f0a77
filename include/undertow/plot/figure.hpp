#pragma once
// One figure file: a PLplot stream on a cairo driver (PNG, SVG or PDF), never an interactive
// device, drawn in undertow's style and written under a temporary name that is renamed into
// place by commit(), so a failed figure leaves no file.
#include <memory>
#include <string>
#include <vector>

#include "undertow/plot/colours.hpp"

class plstream;

namespace undertow::plot {

enum class Format { png, svg, pdf };
Format format_from_name(const std::string& name); // "png", "svg", "pdf"; throws InputError
std::string extension(Format f);                  // "png", ...
std::vector<Format> formats_from_list(const std::string& list); // "png,pdf"
// InputError when PLplot lacks the cairo driver of a format or fontconfig finds no sans-serif
// font: checked before anything is drawn or any folder made.
void require_drawing(const std::vector<Format>& formats);

// The page: physical size and, for PNG, pixels per inch. 88 mm is a single journal column
// (common practice); text is set in millimetres, so it reads the same at any resolution.
struct Page {
  double width_mm = 88, height_mm = 70;
  double dpi = 300;     // PNG only; SVG and PDF are drawn in points (72 per inch)
  double text_mm = 1.6; // PLplot's character height: about a 7-point font
};

// The world box of one panel and where it sits on the page (fractions of the page).
struct Panel {
  double x0 = 0.15, x1 = 0.95, y0 = 0.15, y1 = 0.92; // viewport
  double xmin = 0, xmax = 1, ymin = 0, ymax = 1;     // world coordinates
};

class Figure {
public:
  // Checks that the cairo driver and a sans-serif font are present (InputError naming what is
  // missing) and that the folder is writable.
  Figure(std::string path, Format format, const Page& page = {});
  ~Figure();
  Figure(const Figure&) = delete;
  Figure& operator=(const Figure&) = delete;

  plstream& pls() { return *pls_; }
  const Page& page() const { return page_; }
  Format format() const { return format_; }

  // Style.
  void colour(const Rgb& c, double alpha = 1); // for what is drawn next
  void line_width(double points);              // 1 point = 1/72 inch
  void text_scale(double s);                   // relative to page().text_mm

  // A panel: viewport and world box; axes() draws its frame, ticks and labels in our style.
  void panel(const Panel& p);
  void axes(const std::string& x_label, const std::string& y_label, bool x_numbers = true,
            bool y_numbers = true, bool log_x = false, bool log_y = false, double x_tick = 0,
            double y_tick = 0);
  // Where axes() puts its labels, in character heights from the frame (defaults 3.3 and 4.2).
  void label_offsets(double x, double y) { label_x_ = x, label_y_ = y; }
  // A panel whose world box has equal x and y scales, centred in the viewport.
  void equal_panel(const Panel& p);

  // Drawing in world coordinates of the current panel.
  void line(const std::vector<double>& x, const std::vector<double>& y);
  void dashed(const std::vector<double>& x, const std::vector<double>& y);
  void points(const std::vector<double>& x, const std::vector<double>& y, double size_mm,
              bool filled = true);
  void fill(const std::vector<double>& x, const std::vector<double>& y);
  void error_bars_y(const std::vector<double>& x, const std::vector<double>& lo,
                    const std::vector<double>& hi);
  void arrow(double x, double y, double dx, double dy, double head_mm);
  void ellipse(double x, double y, double a, double b, double angle_rad);
  // Text at a world point; just = 0 left, 0.5 centred, 1 right; turned by angle_deg.
  void text(double x, double y, const std::string& s, double just = 0, double angle_deg = 0);
  // Text relative to the viewport: side "t", "b", "l", "r" (PLplot's mtex), displacement in
  // character heights, position along the side in [0, 1].
  void side_text(const std::string& side, double disp, double pos, double just,
                 const std::string& s);
  // A legend of (colour, label, kind) rows, kind 'l' line, 'd' dashed line, 'p' point, 'o' open
  // point, 'b' box, at the top left (or right) inside the current panel; or in one row above the
  // panel.
  struct Key {
    Rgb colour;
    std::string label;
    char kind = 'l';
  };
  void legend(const std::vector<Key>& keys, bool right = false);
  void legend_above(const std::vector<Key>& keys);
  // A line of text inside the panel's top left (or right) corner; row 0 is the top line.
  void note(int row, const std::string& s, double scale = 1.0, bool right = false);

  // A colour image of z[iy * nx + ix] over the world box, the sequential() map from lo to hi.
  void image(const std::vector<double>& z, int nx, int ny, double lo, double hi);
  // Contours of z (same layout) over the world box at the given levels.
  void contours(const std::vector<double>& z, int nx, int ny, const std::vector<double>& levels);
  // The same on a rectilinear grid: z[iy * xg.size() + ix] at (xg[ix], yg[iy]).
  void contours(const std::vector<double>& z, const std::vector<double>& xg,
                const std::vector<double>& yg, const std::vector<double>& levels);
  // Filled rectangles [x_edges[i], x_edges[i+1]] x [y_edges[j], y_edges[j+1]] coloured by
  // z[j * nx + i] on the sequential() map from lo to hi (NaN: left empty).
  void cells(const std::vector<double>& z, const std::vector<double>& x_edges,
             const std::vector<double>& y_edges, double lo, double hi);
  // A colour bar to the right of the current panel.
  void colour_bar(double lo, double hi, const std::string& label);

  // Where a world point of the current panel lands on the page, as fractions of its width
  // (from the left) and height (from the top): for checks of the drawn pixels.
  std::pair<double, double> page_fraction(double x, double y);

  // Finishes the file and moves it into place.
  void commit();

private:
  double mm_scale() const;
  void draw_key(const Key& k, double x, double y, double kx, double ky, double sample);
  std::string path_, tmp_;
  Format format_;
  Page page_;
  Panel panel_;
  std::unique_ptr<plstream> pls_;
  bool done_ = false;
  double label_x_ = 3.3, label_y_ = 4.2;
};

} // namespace undertow::plot
