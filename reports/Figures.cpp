#include "reports/Figures.h"

#include "photometry/DwarfLocus.h"
#include "photometry/StellarClass.h"
#include "photometry/WhiteDwarfSequence.h"
#include "photometry/base/AtomicOutput.h"
#include "photometry/base/InputError.h"

#include <plplot/plplot.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <functional>
#include <limits>
#include <map>
#include <optional>
#include <ostream>
#include <sstream>
#include <string_view>
#include <tuple>
#include <utility>

namespace starcensus::reports {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// cmap0 indices. 1-8 are the Okabe-Ito palette (Okabe & Ito 2008, "Color Universal Design"; hex values
// from memory), 9-11 greys for context.
enum Colour : PLINT {
    kWhite = 0,
    kBlack = 1,
    kOrange = 2,
    kSkyBlue = 3,
    kBluishGreen = 4,
    kYellow = 5,
    kBlue = 6,
    kVermillion = 7,
    kReddishPurple = 8,
    kGrey = 9,
    kLightGrey = 10,
    kDarkGrey = 11,
};
constexpr std::array<std::array<PLINT, 3>, 12> kPalette = {{{255, 255, 255},
                                                            {0, 0, 0},
                                                            {230, 159, 0},
                                                            {86, 180, 233},
                                                            {0, 158, 115},
                                                            {240, 228, 66},
                                                            {0, 114, 178},
                                                            {213, 94, 0},
                                                            {204, 121, 167},
                                                            {153, 153, 153},
                                                            {221, 221, 221},
                                                            {85, 85, 85}}};

struct SeriesStyle {
    PLINT colour;
    const char* glyph; // drawn with plstring (UTF-8, Cairo renders it with the system font)
};

/// One style per class, fixed so a class looks the same in every figure; other names (user groups)
/// take the `group_index`-th of a separate cycle.
SeriesStyle classStyle(const std::string& name, std::size_t group_index = 0) {
    static const std::map<std::string, SeriesStyle> fixed = {{"O", {kReddishPurple, "▲"}},
                                                             {"B", {kReddishPurple, "▼"}},
                                                             {"A", {kBlue, "▲"}},
                                                             {"F", {kSkyBlue, "■"}},
                                                             {"G", {kOrange, "●"}},
                                                             {"K", {kVermillion, "◆"}},
                                                             {"M", {kBlue, "●"}},
                                                             {"L", {kBlack, "▲"}},
                                                             {"T", {kBlack, "▼"}},
                                                             {"Y", {kBlack, "■"}},
                                                             {"WD", {kBluishGreen, "■"}},
                                                             {"evolved", {kDarkGrey, "★"}},
                                                             {"unclassified", {kGrey, "×"}},
                                                             {"all", {kBlack, "✚"}}};
    if (const auto found = fixed.find(name); found != fixed.end()) {
        return found->second;
    }
    static const std::array<SeriesStyle, 6> cycle = {{{kBlack, "✚"},
                                                      {kVermillion, "▼"},
                                                      {kSkyBlue, "◆"},
                                                      {kReddishPurple, "■"},
                                                      {kBluishGreen, "●"},
                                                      {kOrange, "▲"}}};
    return cycle[group_index % cycle.size()];
}

SeriesStyle radiusStyle(std::size_t index) {
    static const std::array<SeriesStyle, 7> styles = {{{kBlue, "●"},
                                                       {kOrange, "■"},
                                                       {kBluishGreen, "▲"},
                                                       {kVermillion, "◆"},
                                                       {kReddishPurple, "▼"},
                                                       {kSkyBlue, "★"},
                                                       {kBlack, "✚"}}};
    return styles[index % styles.size()];
}

std::string formatNumber(double value, int precision = 3) {
    std::ostringstream text;
    text.precision(precision);
    text << value;
    return text.str();
}

// ---- PLplot plumbing ----------------------------------------------------------------------------

struct Device {
    const char* name;
    const char* extension;
};
constexpr std::array<Device, 3> kDevices = {
    {{"svgcairo", ".svg"}, {"pdfcairo", ".pdf"}, {"pngcairo", ".png"}}};

void requireCairoDevices() {
    // plgDevs fills caller-owned arrays; `count` goes in as their size and comes back as the number found.
    constexpr int kMaxDevices = 128;
    std::array<const char*, kMaxDevices> menu{};
    std::array<const char*, kMaxDevices> names{};
    const char** menu_pointer = menu.data();
    const char** names_pointer = names.data();
    int count = kMaxDevices;
    plgDevs(&menu_pointer, &names_pointer, &count);
    for (const auto& device : kDevices) {
        if (std::none_of(names.begin(), names.begin() + count,
                         [&](const char* name) { return std::string(name) == device.name; })) {
            throw InputError(std::string("PLplot has no ") + device.name +
                             " device: install Debian's plplot-driver-cairo");
        }
    }
}

struct PageSize {
    PLINT width = 900; // pixels (PNG) or points (PDF, SVG)
    PLINT height = 600;
};

/// One PLplot stream writing one file; the stream is ended (and the file closed) on destruction.
class PlotStream {
  public:
    PlotStream(const Device& device, const std::filesystem::path& path, PageSize size) {
        plmkstrm(&stream_);
        plsdev(device.name);
        plsfnam(path.c_str());
        plspage(0.0, 0.0, size.width, size.height, 0, 0);
        std::array<PLINT, kPalette.size()> red{};
        std::array<PLINT, kPalette.size()> green{};
        std::array<PLINT, kPalette.size()> blue{};
        for (std::size_t i = 0; i < kPalette.size(); ++i) {
            red[i] = kPalette[i][0];
            green[i] = kPalette[i][1];
            blue[i] = kPalette[i][2];
        }
        plscmap0(red.data(), green.data(), blue.data(), static_cast<PLINT>(kPalette.size()));
        plinit();
        plschr(0.0, 0.95);
    }
    ~PlotStream() {
        plsstrm(stream_);
        plend1();
    }
    PlotStream(const PlotStream&) = delete;
    PlotStream& operator=(const PlotStream&) = delete;

  private:
    PLINT stream_ = 0;
};

/// Draws the figure on one device into `path`, atomically.
void renderOn(const Device& device, const std::filesystem::path& path, PageSize size,
              const std::function<void()>& draw) {
    AtomicOutput output(path);
    {
        PlotStream stream(device, output.temporaryPath(), size);
        pladv(0);
        draw();
    }
    output.commit();
}

/// One device's file drawn by a child process, beside the caller's other devices: PLplot keeps global
/// state and cannot draw on two threads, but a forked copy of the process can (the report of a 4x10^5
/// candidate run: 3.2 s in one process, 1.6-2.4 s so). The child writes its file atomically and reports
/// an error through a pipe; wait() throws it. Where fork fails, wait() draws the file in this process.
class ChildRendering {
  public:
    ChildRendering(const Device& device, std::filesystem::path path, PageSize size,
                   const std::function<void()>& draw)
        : device_(device), path_(std::move(path)), size_(size), draw_(draw) {
        int pipe_ends[2];
        if (pipe(pipe_ends) != 0) {
            return;
        }
        pid_ = fork();
        if (pid_ == 0) {
            close(pipe_ends[0]);
            int status = 0;
            try {
                renderOn(device_, path_, size_, draw_);
            } catch (const std::exception& error) {
                const std::string message = error.what();
                [[maybe_unused]] const auto written = write(pipe_ends[1], message.data(), message.size());
                status = 1;
            } catch (...) {
                status = 1;
            }
            _exit(status); // no destructors or exit handlers of the parent's objects
        }
        close(pipe_ends[1]);
        if (pid_ < 0) {
            close(pipe_ends[0]);
            return;
        }
        message_pipe_ = pipe_ends[0];
    }
    ChildRendering(const ChildRendering&) = delete;
    ChildRendering& operator=(const ChildRendering&) = delete;
    ~ChildRendering() {
        if (pid_ > 0) { // not waited for: an exception left the caller
            close(message_pipe_);
            int ignored = 0;
            waitpid(pid_, &ignored, 0);
        }
    }

    void wait() {
        if (pid_ <= 0) {
            renderOn(device_, path_, size_, draw_);
            return;
        }
        std::string message;
        char buffer[512];
        for (ssize_t got = 0; (got = read(message_pipe_, buffer, sizeof buffer)) != 0;) {
            if (got > 0) {
                message.append(buffer, static_cast<std::size_t>(got));
            } else if (errno != EINTR) {
                break;
            }
        }
        close(message_pipe_);
        int status = 0;
        const pid_t child = std::exchange(pid_, -1);
        while (waitpid(child, &status, 0) < 0 && errno == EINTR) {
        }
        if (!WIFEXITED(status) || WEXITSTATUS(status) != 0) {
            // The child's own message names the file; a child that died without one is named here.
            throw InputError(message.empty()
                                 ? "cannot draw " + path_.string() + ": its drawing process ended abnormally"
                                 : message);
        }
    }

  private:
    const Device& device_;
    std::filesystem::path path_;
    PageSize size_;
    const std::function<void()>& draw_;
    pid_t pid_ = -1;
    int message_pipe_ = -1;
};

/// Draws one figure on every device into directory/<id>.{svg,pdf,png}, each file atomically: the PNG
/// (the raster and its compression, the costliest) in a child process while this one writes the SVG and
/// the PDF.
FigureOutput renderFigure(const std::filesystem::path& directory, std::string id, std::string title,
                          std::string caption, PageSize size, const std::function<void()>& draw) {
    FigureOutput figure{std::move(id), std::move(title), std::move(caption), {}, {}, {}};
    figure.svg = directory / (figure.id + ".svg");
    figure.pdf = directory / (figure.id + ".pdf");
    figure.png = directory / (figure.id + ".png");
    static_assert(std::string_view(kDevices[0].extension) == ".svg" &&
                  std::string_view(kDevices[1].extension) == ".pdf" &&
                  std::string_view(kDevices[2].extension) == ".png");
    ChildRendering png(kDevices[2], figure.png, size, draw);
    renderOn(kDevices[0], figure.svg, size, draw);
    renderOn(kDevices[1], figure.pdf, size, draw);
    png.wait();
    return figure;
}

void drawLine(const std::vector<PLFLT>& x, const std::vector<PLFLT>& y, PLINT colour, PLINT style,
              PLFLT width = 1.5) {
    if (x.size() < 2) {
        return;
    }
    plcol0(colour);
    pllsty(style);
    plwidth(width);
    plline(static_cast<PLINT>(x.size()), x.data(), y.data());
    pllsty(1);
    plwidth(1.0);
}

void drawGlyphs(const std::vector<PLFLT>& x, const std::vector<PLFLT>& y, SeriesStyle style, PLFLT scale) {
    if (x.empty()) {
        return;
    }
    plcol0(style.colour);
    plschr(0.0, scale);
    plstring(static_cast<PLINT>(x.size()), x.data(), y.data(), style.glyph);
    plschr(0.0, 0.95);
}

struct LegendEntry {
    std::string label;
    SeriesStyle style;
    bool symbol = true;
    PLINT line_style = 0; // 0: no line
};

/// A legend outside the right edge of the viewport (or inside its top-left corner).
void drawLegend(const std::vector<LegendEntry>& entries, bool inside_top_left = false) {
    const auto n = static_cast<PLINT>(entries.size());
    std::vector<PLINT> options;
    std::vector<const char*> texts;
    std::vector<PLINT> colours;
    std::vector<PLINT> line_styles;
    std::vector<PLFLT> line_widths(entries.size(), 1.5);
    std::vector<PLFLT> symbol_scales(entries.size(), 0.9);
    std::vector<PLINT> symbol_numbers;
    std::vector<const char*> symbols;
    for (const auto& entry : entries) {
        options.push_back((entry.symbol ? PL_LEGEND_SYMBOL : 0) |
                          (entry.line_style > 0 ? PL_LEGEND_LINE : 0));
        texts.push_back(entry.label.c_str());
        colours.push_back(entry.style.colour);
        line_styles.push_back(std::max<PLINT>(entry.line_style, 1));
        symbol_numbers.push_back(entry.line_style > 0 ? 2 : 1);
        symbols.push_back(entry.style.glyph);
    }
    PLFLT width = 0.0;
    PLFLT height = 0.0;
    const PLINT position =
        inside_top_left ? (PL_POSITION_LEFT | PL_POSITION_TOP | PL_POSITION_INSIDE | PL_POSITION_VIEWPORT)
                        : (PL_POSITION_RIGHT | PL_POSITION_OUTSIDE | PL_POSITION_VIEWPORT);
    pllegend(&width, &height, PL_LEGEND_BACKGROUND | PL_LEGEND_BOUNDING_BOX, position, 0.02, 0.0, 0.06,
             kWhite, kBlack, 1, 0, 0, n, options.data(), 1.0, 0.75, 1.8, 0.0, colours.data(), texts.data(),
             nullptr, nullptr, nullptr, nullptr, colours.data(), line_styles.data(), line_widths.data(),
             colours.data(), symbol_scales.data(), symbol_numbers.data(), symbols.data());
    plcol0(kBlack);
}

void frame(PLFLT x_min, PLFLT x_max, PLFLT y_min, PLFLT y_max, const char* x_options, const char* y_options,
           const char* x_label, const char* y_label, const std::string& title, PLFLT right_edge = 0.74) {
    plvpor(0.1, right_edge, 0.12, 0.9);
    plwind(x_min, x_max, y_min, y_max);
    plcol0(kBlack);
    plbox(x_options, 0.0, 0, y_options, 0.0, 0);
    plmtex("b", 3.0, 0.5, 0.5, x_label);
    plmtex("l", 4.5, 0.5, 0.5, y_label);
    plmtex("t", 1.5, 0.5, 0.5, title.c_str());
}

double logOrNaN(double value) {
    return value > 0.0 ? std::log10(value) : kNaN;
}

// ---- the figures ----------------------------------------------------------------------------------

// Viridis anchors (van der Walt & Smith 2015, matplotlib's "viridis"; values from memory).
void setSequentialColourMap() {
    const std::array<PLFLT, 5> position = {0.0, 0.25, 0.5, 0.75, 1.0};
    const std::array<PLFLT, 5> red = {0x44 / 255.0, 0x3b / 255.0, 0x21 / 255.0, 0x5e / 255.0, 0xfd / 255.0};
    const std::array<PLFLT, 5> green = {0x01 / 255.0, 0x52 / 255.0, 0x91 / 255.0, 0xc9 / 255.0, 0xe7 / 255.0};
    const std::array<PLFLT, 5> blue = {0x54 / 255.0, 0x8b / 255.0, 0x8c / 255.0, 0x62 / 255.0, 0x25 / 255.0};
    plscmap1l(1, 5, position.data(), red.data(), green.data(), blue.data(), nullptr);
}

/// The range of the values a count image shows (log10 of the counts on a log scale).
struct CountRange {
    double low = 0.0;
    double high = 1.0;
};

/// Counts per cell (x-major, as DensityGrid) as one image on the viridis scale, of log10(count) when
/// `log_scale`; cells with at most `blank_at_most` stars (or NaN) are left blank (-1: none). PLplot's Cairo
/// devices embed an image as one raster (a PNG inside the SVG and PDF), so the files do not grow with the
/// number of stars or cells.
CountRange drawCountImage(const std::vector<double>& counts, const GridAxes& axes, double blank_at_most,
                          bool log_scale) {
    // The scale runs from the smallest count drawn to the largest, so a map of similar counts (a
    // well-filled sky) still uses the whole colour range.
    CountRange range{std::numeric_limits<double>::infinity(), -std::numeric_limits<double>::infinity()};
    std::vector<PLFLT> values(counts.size(), kNaN);
    for (std::size_t i = 0; i < counts.size(); ++i) {
        if (counts[i] > blank_at_most) {
            values[i] = log_scale ? std::log10(counts[i]) : counts[i];
            range.low = std::min(range.low, values[i]);
            range.high = std::max(range.high, values[i]);
        }
    }
    if (!std::isfinite(range.low)) {
        range = {0.0, 0.0};
    }
    // A visible scale even when every cell is alike.
    range.high = std::max(range.high, range.low + (log_scale ? 0.5 : 1.0));
    std::vector<const PLFLT*> columns;
    for (int ix = 0; ix < axes.nx; ++ix) {
        columns.push_back(values.data() + static_cast<std::size_t>(ix) * static_cast<std::size_t>(axes.ny));
    }
    setSequentialColourMap();
    plimage(columns.data(), axes.nx, axes.ny, axes.x_min, axes.x_max, axes.y_min, axes.y_max, range.low,
            range.high, axes.x_min, axes.x_max, axes.y_min, axes.y_max);
    return range;
}

/// A horizontal colour bar for counts from `low` to `high` (log10 of them when `log_scale`, labelled as
/// counts), below the viewport or inside its top-right corner.
/// PLplot label function for an axis in log10(count): the count itself ("6.3", "10", "250"), so that a
/// scale of less than a decade is labelled at every major tick, not only at powers of ten.
void countFromLogLabel(PLINT /*axis*/, PLFLT value, char* label, PLINT length, PLPointer /*data*/) {
    const double count = std::pow(10.0, value);
    if (count < 10.0) {
        std::snprintf(label, static_cast<std::size_t>(length), "%.2g", count);
        return;
    }
    const double step = std::pow(10.0, std::floor(value) - 1.0); // two significant digits, no exponent
    std::snprintf(label, static_cast<std::size_t>(length), "%.0f", std::round(count / step) * step);
}

void drawCountBar(const CountRange& range, const char* label, bool log_scale, bool inside_top_right) {
    // Log scale: ticks in log10(count), labelled with the counts (countFromLogLabel).
    const std::string axis = std::string("bcnst") + (log_scale ? "o" : "");
    plslabelfunc(log_scale ? countFromLogLabel : nullptr, nullptr);
    const char* axis_options[] = {axis.c_str()};
    const char* labels[] = {label};
    PLINT label_options[] = {PL_COLORBAR_LABEL_BOTTOM};
    PLFLT ticks[] = {0.0};
    PLINT sub_ticks[] = {0};
    PLINT value_counts[] = {2};
    const PLFLT values_range[] = {range.low, range.high};
    const PLFLT* values[] = {values_range};
    PLFLT width = 0.0;
    PLFLT height = 0.0;
    plschr(0.0, 0.7);
    const PLINT position =
        inside_top_right ? PL_POSITION_RIGHT | PL_POSITION_TOP | PL_POSITION_INSIDE | PL_POSITION_VIEWPORT
                         : PL_POSITION_BOTTOM | PL_POSITION_OUTSIDE | PL_POSITION_VIEWPORT;
    plcolorbar(&width, &height,
               PL_COLORBAR_GRADIENT | PL_COLORBAR_BOUNDING_BOX | PL_COLORBAR_BACKGROUND |
                   PL_COLORBAR_ORIENT_RIGHT,
               position, inside_top_right ? 0.04 : 0.0, 0.04, inside_top_right ? 0.3 : 0.5, 0.025, kWhite,
               kBlack, 1, 0.0, 0.0, kBlack, 1.0, 1, label_options, labels, 1, axis_options, ticks, sub_ticks,
               value_counts, values);
    plslabelfunc(nullptr, nullptr);
    plschr(0.0, 0.95);
}

FigureOutput colourMagnitudeFigure(const ReportInputs& inputs, const ReportAnalysis& analysis,
                                   const std::filesystem::path& directory) {
    const SampleColumns& sample = inputs.sample;
    const auto& grid = analysis.cmd_grid;
    const auto& axes = grid.axes;
    const bool density = analysis.cmd_density_form;
    const auto outliers_at_most = analysis.density.max_outliers_per_cell;
    // Markers per class: every star, or in the density form the stars of sparse cells only.
    std::map<std::string, std::pair<std::vector<PLFLT>, std::vector<PLFLT>>> by_class;
    std::size_t markers = 0;
    for (const auto row : analysis.cmd_rows) {
        const double colour = sample.bp_rp_mag[row];
        const double magnitude = sample.abs_g_mag[row];
        if (density) {
            const auto cell = grid.cellOf(colour, magnitude);
            if (cell && grid.counts[*cell] > outliers_at_most) {
                continue;
            }
        }
        auto& points = by_class[sample.class_name[row]];
        points.first.push_back(colour);
        points.second.push_back(magnitude);
        ++markers;
    }
    std::vector<PLFLT> locus_x;
    std::vector<PLFLT> locus_y;
    for (const auto& point : photometry::DwarfLocus::shipped().points()) {
        if (std::isfinite(point.bp_rp_mag) && std::isfinite(point.abs_g_mag)) {
            locus_x.push_back(point.bp_rp_mag);
            locus_y.push_back(point.abs_g_mag);
        }
    }
    constexpr double kWhiteDwarfLogG = 8.0;
    std::vector<PLFLT> white_dwarf_x;
    std::vector<PLFLT> white_dwarf_y;
    for (const auto& model :
         photometry::WhiteDwarfSequence::shipped().models(photometry::WhiteDwarfAtmosphere::Hydrogen)) {
        if (std::abs(model.log_g - kWhiteDwarfLogG) < 1e-6) {
            white_dwarf_x.push_back(model.abs_bp_mag - model.abs_rp_mag);
            white_dwarf_y.push_back(model.abs_g_mag);
        }
    }
    const std::string limit_label = "G = " + formatNumber(analysis.faint_limit_g) + " at " +
                                    formatNumber(analysis.largest_radius_pc) + " pc";
    std::ostringstream caption;
    caption << analysis.members.size() << " stars with membership probability ≥ "
            << analysis.member_probability << " at " << analysis.largest_radius_pc << " pc";
    if (density) {
        caption << ": too many for one marker each, so the shading is the number of stars per cell of "
                << formatNumber((axes.x_max - axes.x_min) / axes.nx, 2) << " mag in BP−RP by "
                << formatNumber((axes.y_max - axes.y_min) / axes.ny, 2) << " mag in M_G (log scale), and the "
                << markers << " stars of cells with at most " << outliers_at_most
                << " stars are drawn as markers by class (exact classifier)";
    } else {
        caption << ", by class (exact classifier)";
    }
    caption
        << "; " << analysis.cmd_without_colour
        << " of them have no BP−RP or M_G (e.g. brown dwarfs seen in the near infrared only) and are not "
        << "shown. Solid line: the "
        << "mean dwarf locus (Pecaut & Mamajek 2013); dashed: the DA white-dwarf cooling sequence at log g "
        << "= 8.0 (Montreal models); dotted: the faint limit " << limit_label
        << " (M_G = " << formatNumber(analysis.faint_limit_abs_g)
        << "; source: " << analysis.faint_limit_source << ").";
    return renderFigure(directory, "cmd", "Colour–absolute-magnitude diagram", caption.str(), {}, [&] {
        frame(axes.x_min, axes.x_max, axes.y_max, axes.y_min, "bcnst", "bcnstv", "G#dBP#u − G#dRP#u (mag)",
              "M#dG#u (mag)", "Colour–absolute-magnitude diagram");
        std::optional<CountRange> shaded;
        if (density) {
            // The window's y axis runs downwards (bright at the top); the image is placed in world
            // coordinates, so it follows.
            shaded = drawCountImage(std::vector<double>(grid.counts.begin(), grid.counts.end()), axes,
                                    static_cast<double>(outliers_at_most), true);
            plcol0(kBlack);
            plbox("bcst", 0.0, 0, "bcst", 0.0, 0); // the ticks again, over the image
        }
        std::vector<LegendEntry> legend;
        // The most numerous classes first, so rare ones stay visible on top.
        std::vector<std::pair<std::size_t, std::string>> order;
        for (const auto& [name, points] : by_class) {
            order.emplace_back(points.first.size(), name);
        }
        std::sort(order.rbegin(), order.rend());
        for (const auto& [count, name] : order) {
            const auto& points = by_class[name];
            drawGlyphs(points.first, points.second, classStyle(name), 0.45);
            legend.push_back({name + " (" + std::to_string(count) + ")", classStyle(name)});
        }
        drawLine(locus_x, locus_y, kBlack, 1);
        drawLine(white_dwarf_x, white_dwarf_y, kBlack, 2);
        drawLine({axes.x_min, axes.x_max}, {analysis.faint_limit_abs_g, analysis.faint_limit_abs_g},
                 kVermillion, 3);
        legend.push_back({"dwarf locus", {kBlack, ""}, false, 1});
        legend.push_back({"DA log g 8.0", {kBlack, ""}, false, 2});
        legend.push_back({limit_label, {kVermillion, ""}, false, 3});
        drawLegend(legend);
        if (shaded) {
            drawCountBar(*shaded, "stars per cell", true, true);
        }
    });
}

FigureOutput luminosityFunctionFigure(const ReportInputs& inputs, const std::filesystem::path& directory) {
    const auto& bins = *inputs.luminosity_function;
    std::vector<std::string> populations;
    double x_min = std::numeric_limits<double>::infinity();
    double x_max = -x_min;
    double y_min = x_min;
    double y_max = -x_min;
    for (const auto& bin : bins) {
        if (std::find(populations.begin(), populations.end(), bin.population) == populations.end()) {
            populations.push_back(bin.population);
        }
        x_min = std::min(x_min, bin.abs_g_lo);
        x_max = std::max(x_max, bin.abs_g_hi);
        for (const double value :
             {bin.phi_per_pc3_per_mag, bin.phi_lo68, bin.phi_hi68, bin.model_phi_per_pc3_per_mag}) {
            if (value > 0.0) {
                y_min = std::min(y_min, std::log10(value));
                y_max = std::max(y_max, std::log10(value));
            }
        }
    }
    if (!std::isfinite(y_min)) {
        y_min = -5.0;
        y_max = -1.0;
    }
    y_min -= 0.3;
    y_max += 0.3;
    std::array<double, 2> complete = {kNaN, kNaN};
    if (inputs.luminosity_function_fit && inputs.luminosity_function_fit->contains("complete_abs_g_range")) {
        complete = inputs.luminosity_function_fit->at("complete_abs_g_range").get<std::array<double, 2>>();
    }
    std::string caption = "Number density per unit absolute magnitude from lumfunc.csv, with 68% intervals "
                          "(vertical bars) and bin widths (horizontal bars); lines: the fitted model where "
                          "lumfunc.csv gives one.";
    if (std::isfinite(complete[0])) {
        caption += " Dotted verticals: the complete M_G range of the fit (" + formatNumber(complete[0]) +
                   " to " + formatNumber(complete[1]) + " mag).";
    }
    static const std::map<std::string, SeriesStyle> styles = {
        {"main_sequence", {kBlue, "●"}}, {"white_dwarf", {kBluishGreen, "■"}}, {"evolved", {kOrange, "◆"}}};
    return renderFigure(directory, "luminosity_function", "Luminosity function", caption, {}, [&] {
        frame(x_min - 0.5, x_max + 0.5, y_min, y_max, "bcnst", "bcnstlv", "M#dG#u (mag)",
              "Φ (pc#u−3#d mag#u−1#d)", "Luminosity function");
        std::vector<LegendEntry> legend;
        bool with_model = false;
        for (const auto& population : populations) {
            const SeriesStyle style =
                styles.count(population) != 0 ? styles.at(population) : classStyle(population);
            std::vector<PLFLT> x, y, lo, hi, x_lo, x_hi, model_x, model_y;
            for (const auto& bin : bins) {
                if (bin.population != population) {
                    continue;
                }
                const double centre = 0.5 * (bin.abs_g_lo + bin.abs_g_hi);
                if (bin.phi_per_pc3_per_mag > 0.0) {
                    x.push_back(centre);
                    y.push_back(std::log10(bin.phi_per_pc3_per_mag));
                    lo.push_back(bin.phi_lo68 > 0.0 ? std::log10(bin.phi_lo68) : y_min);
                    hi.push_back(logOrNaN(bin.phi_hi68));
                    x_lo.push_back(bin.abs_g_lo);
                    x_hi.push_back(bin.abs_g_hi);
                }
                if (bin.model_phi_per_pc3_per_mag > 0.0) {
                    model_x.push_back(centre);
                    model_y.push_back(std::log10(bin.model_phi_per_pc3_per_mag));
                }
            }
            plcol0(style.colour);
            if (!x.empty()) {
                plerry(static_cast<PLINT>(x.size()), x.data(), lo.data(), hi.data());
                plerrx(static_cast<PLINT>(x.size()), x_lo.data(), x_hi.data(), y.data());
            }
            drawGlyphs(x, y, style, 0.8);
            drawLine(model_x, model_y, style.colour, 2, 2.0);
            std::string label = population;
            std::replace(label.begin(), label.end(), '_', ' ');
            legend.push_back({label, style});
            with_model = with_model || !model_x.empty();
        }
        if (with_model) {
            legend.push_back({"fitted model", {kBlack, ""}, false, 2});
        }
        for (const double edge : complete) {
            if (std::isfinite(edge)) {
                drawLine({edge, edge}, {y_min, y_max}, kGrey, 3, 1.0);
            }
        }
        drawLegend(legend);
    });
}

FigureOutput cumulativeCountsFigure(const ReportInputs& inputs, const ReportAnalysis& analysis,
                                    const std::filesystem::path& directory) {
    const auto& radii = inputs.sample.radii_pc;
    const double r_max = analysis.largest_radius_pc;
    const double r_min = std::min(1.0, radii.front() / 2.0);
    constexpr double kMinStarsPerCurve = 20.0;
    std::vector<const ClassDistances*> series = {&analysis.all};
    for (const auto& distances : analysis.classes) {
        if (countWithin(distances.distances_pc, r_max) >= kMinStarsPerCurve) {
            series.push_back(&distances);
        }
    }
    const double n_max = std::max(countWithin(analysis.all.distances_pc, r_max), 1.0);
    const std::string caption =
        "Solid lines: N(<r), the number of sample stars whose parallax (minus the zero point " +
        formatNumber(analysis.parallax_zero_point_mas) +
        " mas) puts them within r (hard cut on 1000/parallax), per class (classes with at least " +
        formatNumber(kMinStarsPerCurve) + " stars within " + formatNumber(r_max) +
        " pc). Dashed: the uniform-density expectation N(<R) (r/R)³ through "
        "the count at R = " +
        formatNumber(r_max) +
        " pc. Markers: membership-weighted counts (sum of "
        "p_within) at the census radii.";
    return renderFigure(directory, "cumulative_counts", "N(<r) against the r³ expectation", caption, {}, [&] {
        frame(std::log10(r_min), std::log10(r_max * 1.05), -0.2, std::log10(n_max) + 0.3, "bcfnstl",
              "bcfnstlv", "distance r (pc)", "N(<r)", "Cumulative counts and the r³ expectation");
        constexpr int kSteps = 200;
        std::vector<LegendEntry> legend;
        for (const auto* distances : series) {
            const SeriesStyle style = classStyle(distances->class_name);
            const double n_at_max = countWithin(distances->distances_pc, r_max);
            std::vector<PLFLT> x, y, expected_x, expected_y;
            for (int step = 0; step <= kSteps; ++step) {
                const double log_r =
                    std::log10(r_min) + (std::log10(r_max) - std::log10(r_min)) * step / kSteps;
                const double r = std::pow(10.0, log_r);
                const double n = countWithin(distances->distances_pc, r);
                if (n > 0.0) {
                    x.push_back(log_r);
                    y.push_back(std::log10(n));
                }
                const double expected = n_at_max * std::pow(r / r_max, 3.0);
                if (expected >= 0.3) {
                    expected_x.push_back(log_r);
                    expected_y.push_back(std::log10(expected));
                }
            }
            drawLine(x, y, style.colour, 1, 2.0);
            drawLine(expected_x, expected_y, style.colour, 2, 1.0);
            std::vector<PLFLT> weighted_x, weighted_y;
            for (std::size_t r = 0; r < radii.size(); ++r) {
                if (distances->weighted_counts[r] > 0.0) {
                    weighted_x.push_back(std::log10(radii[r]));
                    weighted_y.push_back(std::log10(distances->weighted_counts[r]));
                }
            }
            drawGlyphs(weighted_x, weighted_y, style, 0.8);
            legend.push_back({distances->class_name, style, true, 1});
        }
        legend.push_back({"∝ r³", {kBlack, ""}, false, 2});
        drawLegend(legend);
    });
}

/// Classes and groups of fractions.json, classes first in kClassNames order, then the rest by name;
/// only those with members in this volume (95% upper bound of the count above 0) at some radius.
std::vector<std::string> fractionNames(const nlohmann::json& fractions) {
    const auto& largest = fractions.at("radii").back().at("classes");
    std::vector<std::string> names;
    const auto counted = [&](const std::string& name) {
        return std::any_of(fractions.at("radii").begin(), fractions.at("radii").end(),
                           [&](const nlohmann::json& radius) {
                               const auto& classes = radius.at("classes");
                               return classes.contains(name) &&
                                      classes.at(name).at("count").at("this_volume").value("hi95", 0.0) > 0.0;
                           });
    };
    for (const auto name : photometry::kClassNames) {
        if (counted(std::string(name))) {
            names.emplace_back(name);
        }
    }
    for (const auto& [name, value] : largest.items()) {
        if (!photometry::classFromName(name) && counted(name)) {
            names.push_back(name);
        }
    }
    return names;
}

/// Styles for fractionNames(): fixed per class, cycling over the groups.
std::vector<SeriesStyle> nameStyles(const std::vector<std::string>& names) {
    std::vector<SeriesStyle> styles;
    std::size_t groups = 0;
    for (const auto& name : names) {
        styles.push_back(photometry::classFromName(name) ? classStyle(name) : classStyle(name, groups++));
    }
    return styles;
}

struct FractionInterval {
    double median, lo68, hi68, lo95, hi95;
};

FractionInterval fractionAt(const nlohmann::json& radius, const std::string& name) {
    const auto& classes = radius.at("classes");
    if (!classes.contains(name)) {
        return {kNaN, kNaN, kNaN, kNaN, kNaN};
    }
    const auto& interval = classes.at(name).at("fraction").at("population");
    return {interval.value("median", kNaN), interval.value("lo68", kNaN), interval.value("hi68", kNaN),
            interval.value("lo95", kNaN), interval.value("hi95", kNaN)};
}

/// Error bars of fractions on a log axis: thin 95%, thick 68%, marker at the median; an open
/// downward triangle at the 95% upper bound where the median is 0.
void drawFractionPoint(double x, const FractionInterval& fraction, SeriesStyle style, double log_floor) {
    const auto clampLog = [&](double value) {
        return value > 0.0 ? std::max(std::log10(value), log_floor) : log_floor;
    };
    if (!(fraction.median > 0.0)) {
        if (fraction.hi95 > 0.0) {
            drawGlyphs({x}, {clampLog(fraction.hi95)}, {style.colour, "▽"}, 0.8);
        }
        return;
    }
    const PLFLT xs[] = {x};
    plcol0(style.colour);
    PLFLT lo95[] = {clampLog(fraction.lo95)};
    PLFLT hi95[] = {clampLog(fraction.hi95)};
    plwidth(1.0);
    plerry(1, xs, lo95, hi95);
    PLFLT lo68[] = {clampLog(fraction.lo68)};
    PLFLT hi68[] = {clampLog(fraction.hi68)};
    plwidth(3.0);
    plerry(1, xs, lo68, hi68);
    plwidth(1.0);
    drawGlyphs({x}, {std::log10(fraction.median)}, style, 0.8);
}

double fractionLogFloor(const nlohmann::json& fractions, const std::vector<std::string>& names) {
    double smallest = 1.0;
    for (const auto& radius : fractions.at("radii")) {
        for (const auto& name : names) {
            const auto fraction = fractionAt(radius, name);
            for (const double value : {fraction.lo68, fraction.median}) {
                if (value > 0.0) {
                    smallest = std::min(smallest, value);
                }
            }
        }
    }
    return std::max(std::floor(std::log10(smallest) - 0.3), -5.0);
}

FigureOutput fractionsByClassFigure(const ReportInputs& inputs, const std::filesystem::path& directory) {
    const auto& radii = inputs.fractions.at("radii");
    const auto names = fractionNames(inputs.fractions);
    const double log_floor = fractionLogFloor(inputs.fractions, names);
    const std::string caption =
        "Fraction of each class and group among the members, population intervals (the underlying population "
        "the volume samples): marker at the median, thick bar 68%, thin bar 95%; one marker per radius. Open "
        "triangles: 95% upper bounds where the median is 0. Groups are user-defined unions of subtypes.";
    PageSize size;
    size.width = std::max<PLINT>(900, static_cast<PLINT>(60 * names.size() + 300));
    return renderFigure(
        directory, "fractions_by_class", "Fractions per class at each radius", caption, size, [&] {
            plvpor(0.1, 0.82, 0.25, 0.9);
            plwind(-0.5, static_cast<double>(std::max<std::size_t>(names.size(), 1)) - 0.5, log_floor, 0.05);
            plcol0(kBlack);
            plbox("bc", 0.0, 0, "bcnstlv", 0.0, 0);
            plmtex("l", 4.5, 0.5, 0.5, "fraction of members");
            plmtex("t", 1.5, 0.5, 0.5, "Fractions per class at each radius");
            plcol0(kLightGrey);
            for (std::size_t i = 1; i < names.size(); ++i) {
                drawLine({i - 0.5, i - 0.5}, {log_floor, 0.05}, kLightGrey, 1, 0.5);
            }
            plcol0(kBlack);
            for (std::size_t i = 0; i < names.size(); ++i) {
                const double position = (static_cast<double>(i) + 0.5) / static_cast<double>(names.size());
                plmtex("bv", 0.8, position, 1.0, names[i].c_str());
            }
            std::vector<LegendEntry> legend;
            const double spread = 0.6;
            for (std::size_t r = 0; r < radii.size(); ++r) {
                const double offset =
                    radii.size() > 1 ? spread * (static_cast<double>(r) / (radii.size() - 1) - 0.5) : 0.0;
                for (std::size_t i = 0; i < names.size(); ++i) {
                    drawFractionPoint(static_cast<double>(i) + offset, fractionAt(radii[r], names[i]),
                                      radiusStyle(r), log_floor);
                }
                legend.push_back(
                    {formatNumber(radii[r].at("radius_pc").get<double>()) + " pc", radiusStyle(r)});
            }
            drawLegend(legend);
        });
}

FigureOutput fractionsVersusRadiusFigure(const ReportInputs& inputs, const std::filesystem::path& directory) {
    const auto& radii = inputs.fractions.at("radii");
    const auto names = fractionNames(inputs.fractions);
    const double log_floor = fractionLogFloor(inputs.fractions, names);
    const double r_first = radii.front().at("radius_pc").get<double>();
    const double r_last = radii.back().at("radius_pc").get<double>();
    // Radii close together (or one radius) still get an axis a tenth of the largest radius wide or more,
    // so its ticks read as distinct radii.
    const double margin = 0.08 * std::max(r_last - r_first, 0.5 * r_last);
    const auto styles = nameStyles(names);
    const std::string caption =
        "Fraction of each class and group against the census radius (population intervals; bars 68%, thin "
        "bars 95%; open triangles: 95% upper bounds where the median is 0). Markers are shifted slightly "
        "sideways per class so the bars do not overlap.";
    return renderFigure(directory, "fractions_vs_radius", "Fraction against radius", caption, {}, [&] {
        frame(r_first - margin, r_last + margin, log_floor, 0.05, "bcnst", "bcnstlv", "radius (pc)",
              "fraction of members", "Fraction against radius");
        std::vector<LegendEntry> legend;
        for (std::size_t i = 0; i < names.size(); ++i) {
            const SeriesStyle style = styles[i];
            const double shift =
                1.5 * margin * (static_cast<double>(i) / std::max<double>(1.0, names.size() - 1.0) - 0.5);
            std::vector<PLFLT> x, y;
            for (const auto& radius : radii) {
                const double r = radius.at("radius_pc").get<double>() + shift;
                const auto fraction = fractionAt(radius, names[i]);
                drawFractionPoint(r, fraction, style, log_floor);
                if (fraction.median > 0.0) {
                    x.push_back(r);
                    y.push_back(std::log10(fraction.median));
                }
            }
            drawLine(x, y, style.colour, 1, 1.0);
            legend.push_back({names[i], style, true, 1});
        }
        drawLegend(legend);
    });
}

void drawGraticule() {
    for (int l = -180; l <= 180; l += 60) {
        std::vector<PLFLT> x, y;
        for (int b = -90; b <= 90; b += 2) {
            const auto point = hammerAitoff(l, b);
            x.push_back(point.x);
            y.push_back(point.y);
        }
        drawLine(x, y, std::abs(l) == 180 ? kBlack : kGrey, 1, std::abs(l) == 180 ? 1.2 : 0.6);
    }
    for (int b = -60; b <= 60; b += 30) {
        std::vector<PLFLT> x, y;
        for (int l = 180; l >= -180; l -= 2) {
            const auto point = hammerAitoff(l, b);
            x.push_back(point.x);
            y.push_back(point.y);
        }
        drawLine(x, y, kGrey, 1, 0.6);
    }
    plcol0(kBlack);
    plschr(0.0, 0.7);
    for (int l = -120; l <= 120; l += 60) {
        const auto point = hammerAitoff(l, 0.0);
        plptex(point.x, point.y - 0.08, 1.0, 0.0, 0.5, (std::to_string(l < 0 ? l + 360 : l) + "°").c_str());
    }
    for (int b = -60; b <= 60; b += 30) {
        if (b != 0) {
            const auto point = hammerAitoff(180.0, b);
            plptex(point.x - 0.05, point.y, 1.0, 0.0, 1.0, (std::to_string(b) + "°").c_str());
        }
    }
    plschr(0.0, 0.95);
}

void skyPanel(PLFLT y_low, PLFLT y_high, const std::string& title) {
    const auto half = skyWindowHalfSize();
    plvpor(0.06, 0.94, y_low, y_high);
    plwind(-half.x, half.x, -half.y, half.y);
    plvpas(0.06, 0.94, y_low, y_high, half.y / half.x);
    plwind(-half.x, half.x, -half.y, half.y);
    plcol0(kBlack);
    plmtex("t", 1.0, 0.5, 0.5, title.c_str());
}

/// The members one marker each, by class.
void drawMemberMarkers(const ReportInputs& inputs, const ReportAnalysis& analysis) {
    std::map<std::string, std::pair<std::vector<PLFLT>, std::vector<PLFLT>>> by_class;
    for (std::size_t i = 0; i < analysis.members.size(); ++i) {
        const auto point = hammerAitoff(analysis.member_positions[i].l_deg > 180.0
                                            ? analysis.member_positions[i].l_deg - 360.0
                                            : analysis.member_positions[i].l_deg,
                                        analysis.member_positions[i].b_deg);
        auto& points = by_class[inputs.sample.class_name[analysis.members[i]]];
        points.first.push_back(point.x);
        points.second.push_back(point.y);
    }
    for (const auto& [name, points] : by_class) {
        drawGlyphs(points.first, points.second, classStyle(name), 0.35);
    }
}

/// Counts per HEALPix pixel as one image of the map, with its colour bar below the panel. On the log scale
/// empty pixels are blank; on the linear scale they take the bottom colour. The image has ~5 cells across
/// a pixel (a pixel spans ~58.6 deg / nside, the map 360 deg in 32 nside cells), at most one per point of
/// the page (800 across), since PLplot's image costs time per cell on each device, and at least 256
/// across (~3 pt), so that the map's rim is not a staircase.
void drawPixelCounts(const census::PixelCounts& counts, bool log_scale) {
    const auto half = skyWindowHalfSize();
    const int cells_x = std::clamp(32 * counts.nside, 256, 800);
    const GridAxes axes{-half.x, half.x, cells_x, -half.y, half.y, cells_x / 2};
    const auto range =
        drawCountImage(projectedPixelCounts(counts, axes), axes, log_scale ? 0.0 : -1.0, log_scale);
    drawCountBar(range, "stars per pixel", log_scale, false);
}

FigureOutput skyMapFigure(const ReportInputs& inputs, const ReportAnalysis& analysis,
                          const std::filesystem::path& directory) {
    const auto& counts = analysis.sky_counts.counts;
    const int nside = analysis.sky_counts.nside;
    const int map_nside = analysis.sky_map_counts.nside;
    const bool density = analysis.sky_density_form;
    const auto& test = analysis.uniformity;
    const auto pixel_area = [](std::size_t pixels) {
        return formatNumber(41252.96 / static_cast<double>(pixels), 4) + " deg²";
    };
    std::ostringstream caption;
    caption << "Top: the " << analysis.members.size() << " stars with membership probability ≥ "
            << analysis.member_probability << " at " << analysis.largest_radius_pc
            << " pc in Galactic coordinates (Hammer–Aitoff equal-area projection, l = 0 at the centre, l "
            << "increasing to the left), ";
    if (density) {
        caption << "too many for one marker each: stars per HEALPix pixel (nside " << map_nside << ", "
                << pixel_area(analysis.sky_map_counts.counts.size()) << " each) on a log scale, empty "
                << "pixels blank. ";
    } else {
        caption << "by class. ";
    }
    caption << "Bottom: counts per HEALPix pixel (nside " << nside << ", " << test.pixels << " pixels of "
            << pixel_area(counts.size()) << " each); empty pixels outlined in vermillion. Uniformity: χ² = "
            << formatNumber(test.chi_square, 4) << " for " << test.degrees_of_freedom
            << " degrees of freedom, p = " << formatNumber(test.chi_square_p_value) << "; deepest hole "
            << test.min_count << " stars against a mean of " << formatNumber(test.mean_per_pixel)
            << ", p = " << formatNumber(test.deepest_hole_p_value) << " (corrected for " << test.pixels
            << " pixels).";
    const int points_per_edge = std::max(2, 32 / nside);
    return renderFigure(directory, "sky_map", "All-sky map (Galactic)", caption.str(), {900, 1000}, [&] {
        if (density) {
            skyPanel(0.62, 0.96, "Members per HEALPix pixel (nside " + std::to_string(map_nside) + ")");
            drawPixelCounts(analysis.sky_map_counts, true);
        } else {
            skyPanel(0.56, 0.96, "Members in Galactic coordinates");
            drawMemberMarkers(inputs, analysis);
        }
        drawGraticule();

        skyPanel(0.14, 0.47, "Stars per HEALPix pixel (nside " + std::to_string(nside) + ")");
        drawPixelCounts(analysis.sky_counts, false);
        for (const int pixel : test.empty_pixels) {
            for (const auto& piece : projectedPixelOutline(nside, pixel, points_per_edge)) {
                std::vector<PLFLT> x, y;
                for (const auto& point : piece) {
                    x.push_back(point.x);
                    y.push_back(point.y);
                }
                x.push_back(x.front());
                y.push_back(y.front());
                drawLine(x, y, kVermillion, 1, 2.5);
            }
        }
        drawGraticule();
    });
}

/// Multiplicity per primary class at the largest radius (fractions.json "systems"): resolved companions
/// and, beside them, with the likely unresolved binaries; nullopt for a run without systems.
std::optional<FigureOutput> multiplicityFigure(const ReportInputs& inputs,
                                               const std::filesystem::path& directory) {
    const auto& radius = inputs.fractions.at("radii").back();
    if (!radius.contains("systems")) {
        return std::nullopt;
    }
    const auto& multiplicity = radius.at("systems").at("multiplicity");
    std::vector<std::string> names;
    for (const auto& [name, entry] : multiplicity.items()) {
        if (entry.at("primaries").value("median", 0.0) >= 1.0) {
            names.push_back(name);
        }
    }
    const std::string radius_text = formatNumber(radius.at("radius_pc").get<double>());
    const std::string caption = "Share of the system primaries of each class (most massive member, within " +
                                radius_text +
                                " pc) with a resolved companion (filled), and with a resolved companion or a "
                                "member flagged as a likely "
                                "unresolved binary by RUWE or the binary band (open); population intervals, "
                                "thick bar 68%, thin bar 95%.";
    PageSize size;
    size.width = std::max<PLINT>(900, static_cast<PLINT>(70 * names.size() + 300));
    return renderFigure(directory, "multiplicity", "Multiplicity by primary class", caption, size, [&] {
        plvpor(0.1, 0.76, 0.2, 0.9);
        plwind(-0.5, static_cast<double>(std::max<std::size_t>(names.size(), 1)) - 0.5, 0.0, 1.0);
        plcol0(kBlack);
        plbox("bc", 0.0, 0, "bcnstv", 0.0, 0);
        plmtex("l", 4.5, 0.5, 0.5, "multiplicity fraction of primaries");
        plmtex("t", 1.5, 0.5, 0.5, ("Multiplicity by primary class, " + radius_text + " pc").c_str());
        const std::pair<const char*, SeriesStyle> series[] = {
            {"resolved", {kBlue, "●"}}, {"with_unresolved_candidates", {kVermillion, "○"}}};
        for (std::size_t i = 0; i < names.size(); ++i) {
            plcol0(kBlack);
            // Neighbouring labels on alternate lines: "evolved" and "unclassified" are wider than a slot.
            plmtex("b", i % 2 == 0 ? 1.5 : 2.7,
                   (static_cast<double>(i) + 0.5) / static_cast<double>(names.size()), 0.5, names[i].c_str());
            for (std::size_t k = 0; k < 2; ++k) {
                const auto& interval = multiplicity.at(names[i]).at(series[k].first).at("population");
                const PLFLT x[] = {static_cast<double>(i) + (k == 0 ? -0.12 : 0.12)};
                plcol0(series[k].second.colour);
                for (const auto& [lo, hi, width] :
                     {std::tuple{"lo95", "hi95", 1.0}, std::tuple{"lo68", "hi68", 3.0}}) {
                    PLFLT low[] = {interval.value(lo, kNaN)};
                    PLFLT high[] = {interval.value(hi, kNaN)};
                    plwidth(width);
                    plerry(1, x, low, high);
                }
                plwidth(1.0);
                drawGlyphs({x[0]}, {interval.value("median", kNaN)}, series[k].second, 0.8);
            }
        }
        drawLegend({{"resolved", series[0].second}, {"or flagged", series[1].second}});
    });
}

} // namespace

const std::vector<std::string>& reportFigureIds() {
    static const std::vector<std::string> ids = {
        "cmd",     "luminosity_function", "cumulative_counts", "fractions_by_class", "fractions_vs_radius",
        "sky_map", "multiplicity"};
    return ids;
}

std::vector<FigureOutput> drawReportFigures(const ReportInputs& inputs, const ReportAnalysis& analysis,
                                            const std::filesystem::path& directory, std::ostream* progress) {
    requireCairoDevices();
    std::filesystem::create_directories(directory);
    std::vector<FigureOutput> figures;
    const auto step = [&](const std::string& what) {
        if (progress != nullptr) {
            *progress << "report: figure " << figures.size() + 1 << ": " << what << '\n' << std::flush;
        }
    };
    step("colour-magnitude diagram");
    figures.push_back(colourMagnitudeFigure(inputs, analysis, directory));
    if (inputs.luminosity_function) {
        step("luminosity function");
        figures.push_back(luminosityFunctionFigure(inputs, directory));
    }
    step("cumulative counts");
    figures.push_back(cumulativeCountsFigure(inputs, analysis, directory));
    step("fractions per class");
    figures.push_back(fractionsByClassFigure(inputs, directory));
    step("fractions against radius");
    figures.push_back(fractionsVersusRadiusFigure(inputs, directory));
    step("sky map");
    figures.push_back(skyMapFigure(inputs, analysis, directory));
    if (auto multiplicity = multiplicityFigure(inputs, directory)) {
        step("multiplicity");
        figures.push_back(std::move(*multiplicity));
    }
    return figures;
}

} // namespace starcensus::reports
