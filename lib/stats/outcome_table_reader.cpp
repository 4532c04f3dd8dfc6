// Streaming CSV outcome tables and counts JSON into CampaignCounts (see the header).
//
// Speed: a regular file is cut into chunks of options.block_bytes at line starts; two
// threads (options.threads) tally chunks of plain rows on their own and the chunks are
// merged in file order (ParallelTableRead below); any chunk with another kind of line, or
// a shot index already taken, is read again by the general path during its merge, so
// results and messages are those of one thread. Other input (a pipe, threads = 1, a small
// file) is read in blocks of options.block_bytes with fread; complete lines are
// parsed in place (SSE2 masks of the 64 bytes from each line's start for line ends and
// commas; time_s by the exact decimal parsers of decimal_field.hpp, std::from_chars for
// the forms they do not take), so a row costs no allocation. Sequence names are looked up
// in a small open-addressing hash table over string_view. A shot's path through its
// sequence is coded as (1 << length) | bits (bit = 1 for bright, first step most
// significant) and mapped to its cell by a table.
#include "stats/outcome_table_reader.hpp"

#include <algorithm>
#include <bit>
#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <memory>
#include <string_view>
#include <condition_variable>
#include <exception>
#include <mutex>
#include <system_error>
#include <thread>

#include <sys/stat.h>
#include <unistd.h>

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

#include "core/error.hpp"
#include "stats/decimal_field.hpp"

namespace macroreal {

std::string to_string(BadRowPolicy p) { return p == BadRowPolicy::error ? "error" : "skip"; }

BadRowPolicy parse_bad_row_policy(const std::string& s) {
  if (s == "error") return BadRowPolicy::error;
  if (s == "skip") return BadRowPolicy::skip;
  throw DomainError("bad-row policy '" + s + "', but must be 'error' or 'skip'");
}

namespace {

using detail::Decimal;
using detail::eight_digits;
using detail::parse_time;
using detail::parse_time_right_aligned;

constexpr int kMaxSteps = 20;
// Every buffer handed to CsvParser::lines has this many readable bytes after its end, with
// no '\n' among them: lines are scanned 64 bytes at a time and short fields are loaded as
// 8-byte words.
constexpr std::size_t kPadding = 64;

// Bit masks of the commas and line feeds among the 64 bytes at p (bit i = byte p[i]).
inline void separator_masks(const char* p, std::uint64_t& commas, std::uint64_t& newlines) {
#if defined(__SSE2__)
  const __m128i comma = _mm_set1_epi8(','), newline = _mm_set1_epi8('\n');
  commas = newlines = 0;
  for (int i = 0; i < 4; ++i) {
    const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p + 16 * i));
    commas |= std::uint64_t{static_cast<std::uint32_t>(_mm_movemask_epi8(_mm_cmpeq_epi8(v, comma)))} << (16 * i);
    newlines |= std::uint64_t{static_cast<std::uint32_t>(_mm_movemask_epi8(_mm_cmpeq_epi8(v, newline)))} << (16 * i);
  }
#else
  commas = newlines = 0;
  for (int i = 0; i < 64; ++i) {
    commas |= std::uint64_t{p[i] == ','} << i;
    newlines |= std::uint64_t{p[i] == '\n'} << i;
  }
#endif
}

// The end of the line that starts at p: its '\n' or, if there is none before `end`, `end`.
// `newlines` is separator_masks' mask of the 64 bytes at p: a '\n' among them is read off
// the mask, one further on (newlines == 0) is searched with memchr.
inline const char* next_line_end(const char* p, const char* end, std::uint64_t newlines) {
  if (newlines != 0) {
    const char* line_end = p + __builtin_ctzll(newlines);
    return line_end > end ? end : line_end;
  }
  const char* nl = static_cast<const char*>(std::memchr(p, '\n', static_cast<std::size_t>(end - p)));
  return nl ? nl : end;
}

// The first n <= 8 bytes at p as a word, byte i in bits 8i..8i+7 (the bytes after them
// may be read, not used).
inline std::uint64_t short_word(const char* p, std::size_t n) {
  std::uint64_t w;
  std::memcpy(&w, p, 8);
  if constexpr (std::endian::native == std::endian::big) w = __builtin_bswap64(w);
  // (2^(8n) - 1) without a branch for n = 8: shift the all-ones word right instead.
  return w & (~std::uint64_t{0} >> (8 * (8 - std::min<std::size_t>(n, 8)) & 63) &
              (n == 0 ? 0 : ~std::uint64_t{0}));
}

// The same word for a string of at most 8 bytes (longer ones: their first 8).
constexpr std::uint64_t word_of(std::string_view s) {
  std::uint64_t w = 0;
  for (std::size_t i = 0; i < s.size() && i < 8; ++i)
    w |= std::uint64_t{static_cast<unsigned char>(s[i])} << (8 * i);
  return w;
}
constexpr std::uint64_t kDarkWord = word_of("dark"), kBrightWord = word_of("bright");

// Per-sequence facts the row check needs.
struct SequenceShape {
  int steps = 0;
  std::vector<int> code_to_cell;      // (1 << len) | bright bits  ->  cell index or -1
  std::vector<std::uint64_t> seen;    // one bit per shot index (duplicate check)
};

std::vector<SequenceShape> shapes_of(const CampaignCounts& counts) {
  std::vector<SequenceShape> shapes;
  for (const auto& s : counts.sequences) {
    SequenceShape sh;
    sh.steps = static_cast<int>(s.steps.size());
    if (sh.steps > kMaxSteps)
      throw DomainError("sequence " + s.name + " has " + std::to_string(sh.steps) +
                        " steps, but at most 20 are supported");
    if (static_cast<int>(s.dark_is.size()) < sh.steps)
      throw DomainError("sequence " + s.name + " has " + std::to_string(s.dark_is.size()) +
                        " dark_is entries for " + std::to_string(sh.steps) + " steps");
    sh.code_to_cell.assign(std::size_t{2} << sh.steps, -1);
    for (std::size_t j = 0; j < s.cells.size(); ++j) {
      const auto& cell = s.cells[j];
      std::size_t bits = 0;
      for (std::size_t k = 0; k < cell.size(); ++k)
        bits = (bits << 1) | (cell[k] == s.dark_is[k] ? 0u : 1u);
      sh.code_to_cell[(std::size_t{1} << cell.size()) | bits] = static_cast<int>(j);
    }
    shapes.push_back(std::move(sh));
  }
  return shapes;
}

// Small open-addressing hash table: sequence name -> index.
class NameTable {
 public:
  explicit NameTable(const std::vector<std::string>& names) : names_(names) {
    std::size_t cap = 8;
    while (cap < 2 * names_.size()) cap *= 2;
    slots_.assign(cap, -1);
    for (const auto& n : names_) {
      words_.push_back(word_of(n));
      short_names_ = short_names_ && n.size() <= 8;
    }
    for (std::size_t i = 0; i < names_.size(); ++i) {
      std::size_t h = hash(names_[i]) & (cap - 1);
      while (slots_[h] >= 0) h = (h + 1) & (cap - 1);
      slots_[h] = static_cast<int>(i);
    }
  }
  // `s` must have 8 readable bytes from its start (the parser's padding guarantees it).
  int find(std::string_view s) const {
    const std::size_t mask = slots_.size() - 1;
    if (short_names_) {  // all names fit a word: compare words, no byte loop
      if (s.size() > 8) return -1;
      const std::uint64_t w = short_word(s.data(), s.size());
      for (std::size_t h = word_hash(w) & mask;; h = (h + 1) & mask) {
        const int i = slots_[h];
        if (i < 0) return -1;
        if (words_[static_cast<std::size_t>(i)] == w &&
            names_[static_cast<std::size_t>(i)].size() == s.size())
          return i;
      }
    }
    for (std::size_t h = hash(s) & mask;; h = (h + 1) & mask) {
      const int i = slots_[h];
      if (i < 0) return -1;
      if (names_[static_cast<std::size_t>(i)] == s) return i;
    }
  }

 private:
  std::size_t hash(std::string_view s) const {
    if (short_names_) return word_hash(word_of(s));
    std::uint64_t h = 1469598103934665603ull;  // FNV-1a
    for (unsigned char c : s) h = (h ^ c) * 1099511628211ull;
    return static_cast<std::size_t>(h ^ (h >> 29));
  }
  static std::size_t word_hash(std::uint64_t w) {
    w *= 0x9E3779B97F4A7C15ull;
    return static_cast<std::size_t>(w ^ (w >> 31));
  }
  std::vector<std::string> names_;
  std::vector<std::uint64_t> words_;
  bool short_names_ = true;
  std::vector<int> slots_;
};

std::optional<double> threshold_of(const Protocol& protocol, const OutcomeTableOptions& options) {
  return options.threshold ? options.threshold : protocol.detection.threshold;
}

// Parses "dark" / "bright" / a non-negative integer count. Returns 0 dark, 1 bright,
// -1 malformed, -2 a count with no threshold.
// `f` must have 8 readable bytes from its start.
int parse_result(std::string_view f, const std::optional<double>& threshold) {
  if (f.size() == 4 && short_word(f.data(), 4) == kDarkWord) return 0;
  if (f.size() == 6 && short_word(f.data(), 6) == kBrightWord) return 1;
  if (f.empty() || f.size() > 18) return -1;
  std::uint64_t v = 0;
  for (char c : f) {
    if (c < '0' || c > '9') return -1;
    v = v * 10 + static_cast<std::uint64_t>(c - '0');
  }
  if (!threshold) return -2;
  return static_cast<double>(v) <= *threshold ? 0 : 1;
}

// First and last time of a sequence while reading.
struct TimeTrack {
  bool any = false;
  Decimal first, last;
};

void count_reason(RowSummary& rows, const char* reason, long n = 1) {
  rows.rejected += n;
  rows.reasons[reason] += n;
}

constexpr std::size_t kFastTextMax = 24;  // fast-path results text: at most 3 words

// For a text of length n <= kFastTextMax: the masks of its three 8-byte words.
struct TextMasks {
  std::uint64_t m[kFastTextMax + 1][3];
  constexpr TextMasks() : m{} {
    for (std::size_t n = 0; n <= kFastTextMax; ++n)
      for (std::size_t i = 0; i < 3; ++i) {
        const std::size_t k = n <= 8 * i ? 0 : std::min<std::size_t>(n - 8 * i, 8);
        m[n][i] = k >= 8 ? ~std::uint64_t{0} : (std::uint64_t{1} << (8 * k)) - 1;
      }
  }
};
constexpr TextMasks kTextMasks{};

// ----------------------------------------------------------------------------------------
class CsvParser {
 public:
  CsvParser(std::string file, const Protocol& protocol, const OutcomeTableOptions& options)
      : file_(std::move(file)),
        options_(options),
        threshold_(threshold_of(protocol, options)),
        destructive_(protocol.readout == Readout::destructive) {
    result_.counts = empty_counts(protocol);
    result_.time_ranges.assign(result_.counts.sequences.size(), ShotTimeRange{});
    shapes_ = shapes_of(result_.counts);
    times_.assign(result_.counts.sequences.size(), TimeTrack{});
    std::vector<std::string> names;
    for (const auto& s : result_.counts.sequences) names.push_back(s.name);
    names_ = std::make_unique<NameTable>(names);
    for (auto& s : result_.counts.sequences) {
      cell_offset_.push_back(static_cast<int>(flat_cell_.size()));
      for (double& c : s.counts) flat_cell_.push_back(&c);
    }
  }

  // Parses the complete lines in [begin, end) (each ends with '\n', except possibly the
  // last one at the end of input); kPadding readable bytes without '\n' follow `end`.
  void lines(const char* begin, const char* end) {
    // The separator masks of the 64 bytes from each line's start: one fixed amount of
    // work per line and no branch on where a line falls among 64-byte blocks (splicing
    // masks of shared blocks cost a mispredicted branch at every other line). Bytes from
    // `end` on are only read up to end + kPadding and never end a line.
    begin_ = begin;
    const char* p = begin;
    while (p < end) {
      std::uint64_t commas, newlines;
      separator_masks(p, commas, newlines);
      const char* line_end = next_line_end(p, end, newlines);
      // A line shorter than 64 bytes has all its commas in the mask (so has a last line
      // without '\n').
      const bool short_line = line_end - p < 64;
      ++line_no_;
      line(p, line_end, short_line ? commas : 0, short_line);
      p = line_end + 1;
    }
  }

  OutcomeTableRead finish() {
    if (!have_header_) throw InputError(file_, "", "no header line (expected sequence,r1,...)");
    for (std::size_t i = 0; i < times_.size(); ++i)
      if (times_[i].any) result_.time_ranges[i] = {true, times_[i].first.exact(), times_[i].last.exact()};
    return std::move(result_);
  }

  bool have_header() const { return have_header_; }
  bool fast_enabled() const { return fast_.enabled; }

  // ---- Chunks read by several threads (read_outcome_table) ---------------------------
  // A worker tallies a chunk of whole lines on its own (tally_chunk, const: it reads only
  // the header's tables); the chunks are then merged in file order (merge_chunk). A chunk
  // is "plain" if every line is blank, a comment or a row that fast_match takes; for a
  // plain chunk the merge sets the shot bits in order and, if none was set already (no
  // duplicate within the chunk or with an earlier one), adds the tallies: the same state
  // as lines() over the chunk would leave. Any other chunk is given to lines() (the
  // general path, with its messages and line numbers), after the chunks before it.
  struct ChunkTally {
    bool plain = true;
    long lines = 0, rows = 0;
    std::vector<std::uint64_t> cells;  // per flat cell
    std::vector<TimeTrack> times;      // per sequence
    std::vector<std::uint64_t> shots;  // (sequence << 32) | shot, in row order
  };

  void tally_chunk(const char* begin, const char* end, ChunkTally& t) const {
    t.plain = true;
    t.lines = t.rows = 0;
    t.cells.assign(flat_cell_.size(), 0);
    t.times.assign(times_.size(), TimeTrack{});
    t.shots.clear();
    if (!fast_.enabled) {
      t.plain = false;
      return;
    }
    for (const char* p = begin; p < end;) {
      std::uint64_t commas, newlines;
      separator_masks(p, commas, newlines);
      const char* line_end = next_line_end(p, end, newlines);
      // Short only if its '\n' is in the mask: a last line without one is left to lines().
      const bool short_line = newlines != 0;
      ++t.lines;
      const char* e = line_end;
      if (e > p && e[-1] == '\r') --e;
      if (e != p && *p != '#') {
        FastRow r;
        if (!short_line || line_end - p >= 64 || !fast_match(p, e, commas, begin, r)) {
          t.plain = false;
          return;
        }
        ++t.rows;
        ++t.cells[static_cast<std::size_t>(r.flat)];
        if (r.has_shot) t.shots.push_back(std::uint64_t{static_cast<std::uint32_t>(r.seq)} << 32 | r.shot);
        if (r.has_time) track_time(t.times[static_cast<std::size_t>(r.seq)], r.t);
      }
      p = line_end + 1;
    }
  }

  // Merges a plain chunk that follows every line read so far; false (nothing changed) if
  // one of its shots was taken (then the chunk goes to lines()).
  bool merge_chunk(const ChunkTally& t) {
    if (!t.plain) return false;
    std::size_t i = 0;
    for (; i < t.shots.size(); ++i)
      if (!take_shot(shapes_[static_cast<std::size_t>(t.shots[i] >> 32)], static_cast<std::uint32_t>(t.shots[i])))
        break;
    if (i < t.shots.size()) {  // undo: the bits set here were clear before
      for (std::size_t j = 0; j < i; ++j) {
        const auto shot = static_cast<std::uint32_t>(t.shots[j]);
        shapes_[static_cast<std::size_t>(t.shots[j] >> 32)].seen[shot >> 6] &= ~(std::uint64_t{1} << (shot & 63));
      }
      return false;
    }
    for (std::size_t c = 0; c < t.cells.size(); ++c)
      if (t.cells[c] != 0) *flat_cell_[c] += static_cast<double>(t.cells[c]);
    result_.counts.rows.read += t.rows;
    result_.counts.rows.used += t.rows;
    for (std::size_t q = 0; q < t.times.size(); ++q) {
      const TimeTrack& c = t.times[q];
      if (!c.any) continue;
      // An earlier row wins a tie, as in lines(): the chunk's extremes replace only if
      // strictly beyond.
      TimeTrack& g = times_[q];
      if (!g.any) g = c;
      else {
        if (c.first.approx < g.first.approx) g.first = c.first;
        if (c.last.approx > g.last.approx) g.last = c.last;
      }
    }
    line_no_ += t.lines;
    return true;
  }

 private:
  enum Role : int { kIgnore = -1, kSequence = -2, kShot = -3, kTime = -4 };  // >= 0: result k

  // `commas` is the comma mask of the line when `short_line` (the line has < 64 bytes).
  [[gnu::always_inline]] void line(const char* b, const char* e, std::uint64_t commas, bool short_line) {
    if (e > b && e[-1] == '\r') --e;
    if (b == e) return;  // blank line
    if (*b == '#') return;
    if (!have_header_) {
      header(b, e);
      return;
    }
    if (fast_.enabled && short_line && fast_row(b, e, commas)) return;
    row(b, e, commas, short_line);
  }

  void header(const char* b, const char* e) {
    if (e - b >= 3 && std::memcmp(b, "\xEF\xBB\xBF", 3) == 0) b += 3;  // UTF-8 byte-order mark
    std::vector<std::string> names;
    for (const char* p = b;;) {
      const char* c = static_cast<const char*>(std::memchr(p, ',', static_cast<std::size_t>(e - p)));
      names.emplace_back(p, c ? c : e);
      if (!c) break;
      p = c + 1;
    }
    const std::string where = "line " + std::to_string(line_no_);
    std::vector<int> result_cols;
    for (std::size_t i = 0; i < names.size(); ++i) {
      const std::string& n = names[i];
      for (std::size_t j = 0; j < i; ++j)
        if (names[j] == n && !n.empty())
          throw InputError(file_, where + ", column " + std::to_string(i + 1) + " (" + n + ")",
                           "column name repeated (first in column " + std::to_string(j + 1) + ")");
      int role = kIgnore;
      if (n == "sequence") role = kSequence;
      else if (n == "shot") role = kShot;
      else if (n == "time_s") role = kTime;
      else if (n.size() >= 2 && n[0] == 'r' && n[1] >= '1' && n[1] <= '9' &&
               n.find_first_not_of("0123456789", 1) == std::string::npos && n.size() <= 4) {
        role = std::stoi(n.substr(1)) - 1;
        if (role >= kMaxSteps)
          throw InputError(file_, where + ", column " + std::to_string(i + 1) + " (" + n + ")",
                           "at most 20 result columns are supported");
      }
      roles_.push_back(role);
      if (role == kSequence) seq_col_ = static_cast<int>(i);
      if (role == kShot) shot_col_ = static_cast<int>(i);
      if (role == kTime) time_col_ = static_cast<int>(i);
      if (role >= 0) {
        if (static_cast<int>(result_cols.size()) <= role) result_cols.resize(static_cast<std::size_t>(role) + 1, -1);
        result_cols[static_cast<std::size_t>(role)] = static_cast<int>(i);
      }
    }
    column_names_ = names;
    if (std::find(roles_.begin(), roles_.end(), kSequence) == roles_.end())
      throw InputError(file_, where, "the header has no 'sequence' column");
    for (std::size_t k = 0; k < result_cols.size(); ++k)
      if (result_cols[k] < 0)
        throw InputError(file_, where, "the header has r" + std::to_string(result_cols.size()) +
                                           " but no r" + std::to_string(k + 1));
    result_columns_ = result_cols;
    field_begin_.assign(names.size(), nullptr);
    field_end_.assign(names.size(), nullptr);
    have_header_ = true;
    build_fast_table(names);
  }

  // ---- Fast path for the documented column order -------------------------------------
  // When the header is exactly `sequence[,shot][,time_s],r1,...,rN` and every sequence name
  // has at most 8 bytes, a row whose results are words ("dark"/"bright") is recognised by
  // one hash probe on (name, results text): the table holds, for every cell of every
  // sequence, the exact text of the result fields `r1..rN` (empty fields after the end of
  // a destructive shot included). A row that does not match exactly (counts, fewer
  // trailing fields, an unknown name, a bad shot or time, a duplicate) goes to row(),
  // which validates it and names the rule; the fast path only accepts rows row() would
  // accept with the same effect, so the two paths agree row for row.
  struct FastSlot {
    std::uint64_t name = 0, w0 = 0, w1 = 0, w2 = 0;
    std::uint32_t lens = 0;  // name length | results text length << 8
    int seq = -1;            // -1: empty slot
    int cell = -1;
    int flat = -1;           // the cell over all sequences (flat_cell_)
  };
  struct FastTable {
    bool enabled = false;
    bool has_shot = false, has_time = false;
    std::vector<FastSlot> slots;
    std::size_t mask = 0;
    std::uint64_t mult = 1;  // slot = (hash * mult) >> shift, chosen so no two cells collide
    int shift = 58;
  };

  static std::uint64_t fast_hash(std::uint64_t name, std::uint64_t w0, std::uint64_t w1,
                                 std::uint64_t w2, std::uint32_t lens) {
    // Independent products, so the multiplications overlap; collisions only cost a probe.
    const std::uint64_t h = (name ^ lens) * 0x9E3779B97F4A7C15ull + w0 * 0xC2B2AE3D27D4EB4Full +
                            w1 * 0x165667B19E3779F9ull + w2 * 0xD6E8FEB86659FD93ull;
    return h ^ (h >> 29) ^ (h >> 43);
  }

  // The 8-byte word of bytes [8i, 8i+8) of a text of length n (masked to the text).
  static std::uint64_t text_word(const char* p, std::size_t n, std::size_t i) {
    const std::size_t from = 8 * i;
    const std::size_t k = n <= from ? 0 : std::min<std::size_t>(n - from, 8);
    return short_word(p + from, k);
  }

  void build_fast_table(const std::vector<std::string>& names) {
    fast_ = FastTable{};
    if (names.empty() || names[0] != "sequence") return;
    std::size_t c = 1;
    if (c < names.size() && names[c] == "shot") fast_.has_shot = true, ++c;
    if (c < names.size() && names[c] == "time_s") fast_.has_time = true, ++c;
    const std::size_t nres = names.size() - c;
    if (nres == 0 || result_columns_.size() != nres) return;
    for (std::size_t k = 0; k < nres; ++k)
      if (roles_[c + k] != static_cast<int>(k)) return;
    for (const auto& s : result_.counts.sequences)
      if (s.name.empty() || s.name.size() > 8) return;
    std::vector<FastSlot> entries;
    for (std::size_t s = 0; s < shapes_.size(); ++s) {
      const auto& code_to_cell = shapes_[s].code_to_cell;
      for (std::size_t code = 2; code < code_to_cell.size(); ++code) {
        if (code_to_cell[code] < 0) continue;
        const std::size_t len = static_cast<std::size_t>(std::bit_width(code)) - 1;
        if (len > nres) continue;  // needs more result columns than the header has
        std::string text;
        for (std::size_t k = 0; k < nres; ++k) {
          if (k > 0) text += ',';
          if (k < len) text += ((code >> (len - 1 - k)) & 1u) ? "bright" : "dark";
        }
        if (text.size() > kFastTextMax) continue;
        const std::string& name = result_.counts.sequences[s].name;
        const std::size_t tl = text.size();
        text.append(kFastTextMax + 8, '\0');  // text_word reads whole words
        const std::string padded_name = name + std::string(8, '\0');
        FastSlot e;
        e.name = short_word(padded_name.data(), name.size());
        e.w0 = text_word(text.data(), tl, 0);
        e.w1 = text_word(text.data(), tl, 1);
        e.w2 = text_word(text.data(), tl, 2);
        e.lens = static_cast<std::uint32_t>(name.size() | (tl << 8));
        e.seq = static_cast<int>(s);
        e.cell = code_to_cell[code];
        e.flat = cell_offset_[s] + e.cell;
        entries.push_back(e);
      }
    }
    // Every valid row should find its cell at the first probe (no mispredicted second
    // probe): try multipliers, then larger tables, until no two cells share a home slot;
    // if none is found the table still works with linear probing.
    std::size_t cap = 64;
    int bits = 6;
    while (cap < 4 * entries.size()) cap *= 2, ++bits;
    std::uint64_t mult = 0x9E3779B97F4A7C15ull;
    for (bool placed = false; !placed;) {
      for (int attempt = 0; attempt < 64 && !placed; ++attempt) {
        mult = mult * 6364136223846793005ull + 1442695040888963407ull;
        mult |= 1u;
        std::vector<char> used(cap, 0);
        placed = true;
        for (const auto& e : entries) {
          const std::size_t h = (fast_hash(e.name, e.w0, e.w1, e.w2, e.lens) * mult) >> (64 - bits);
          if (used[h]) {
            placed = false;
            break;
          }
          used[h] = 1;
        }
      }
      if (!placed) {
        if (cap >= 1024) break;
        cap *= 2;
        ++bits;
      }
    }
    fast_.slots.assign(cap, FastSlot{});
    fast_.mask = cap - 1;
    fast_.mult = mult;
    fast_.shift = 64 - bits;
    for (const auto& e : entries) {
      std::size_t h = (fast_hash(e.name, e.w0, e.w1, e.w2, e.lens) * mult) >> fast_.shift;
      while (fast_.slots[h].seq >= 0) h = (h + 1) & fast_.mask;
      fast_.slots[h] = e;
    }
    fast_.enabled = true;
  }

  // What the fast path read from a plain row.
  struct FastRow {
    int seq = -1;
    int flat = -1;  // cell index over all sequences (flat_cell_)
    bool has_shot = false, has_time = false;
    std::uint32_t shot = 0;
    Decimal t;
  };

  // The field that starts at q and ends at the lowest comma of `m` (the line's comma mask
  // from b, commas already taken cleared): [field_b, field_e); that comma is cleared and q
  // moves past it. False (nothing changed) if `m` has no comma left.
  [[gnu::always_inline]] static bool next_field(const char* b, std::uint64_t& m, const char*& q,
                                                const char*& field_b, const char*& field_e) {
    if (m == 0) return false;
    const char* c = b + __builtin_ctzll(m);
    m &= m - 1;
    field_b = q;
    field_e = c;
    q = c + 1;
    return true;
  }

  // Returns false unless the row is a plain row of the table that row() would accept if its
  // shot index were not taken yet (the duplicate check is the caller's: against the shot
  // bits here, or when a chunk is merged). Reads no state but the header's; `buffer` is the
  // start of the buffer the line is in.
  [[gnu::always_inline]] bool fast_match(const char* b, const char* e, std::uint64_t commas,
                                         const char* buffer, FastRow& out) const {
    const std::size_t line_len = static_cast<std::size_t>(e - b);  // < 64
    std::uint64_t m = commas & ((std::uint64_t{1} << line_len) - 1);
    const char *q = b, *name_b, *name_e;
    if (!next_field(b, m, q, name_b, name_e)) return false;
    const std::size_t name_len = static_cast<std::size_t>(name_e - name_b);
    if (name_len == 0 || name_len > 8) return false;
    const char *shot_b = q, *shot_e = q, *time_b = q, *time_e = q;
    if (fast_.has_shot && !next_field(b, m, q, shot_b, shot_e)) return false;
    if (fast_.has_time && !next_field(b, m, q, time_b, time_e)) return false;
    const std::size_t tl = static_cast<std::size_t>(e - q);
    if (tl > kFastTextMax) return false;
    const std::uint64_t name = short_word(b, name_len);
    const auto& tm = kTextMasks.m[tl];
    std::uint64_t w0, w1, w2;
    std::memcpy(&w0, q, 8);
    std::memcpy(&w1, q + 8, 8);
    std::memcpy(&w2, q + 16, 8);
    if constexpr (std::endian::native == std::endian::big) {
      w0 = __builtin_bswap64(w0);
      w1 = __builtin_bswap64(w1);
      w2 = __builtin_bswap64(w2);
    }
    w0 &= tm[0];
    w1 &= tm[1];
    w2 &= tm[2];
    const std::uint32_t lens = static_cast<std::uint32_t>(name_len | (tl << 8));
    const FastSlot* slot;
    for (std::size_t h = (fast_hash(name, w0, w1, w2, lens) * fast_.mult) >> fast_.shift;;
         h = (h + 1) & fast_.mask) {
      slot = &fast_.slots[h];
      if (slot->seq < 0) return false;
      if (((slot->name ^ name) | (slot->w0 ^ w0) | (slot->w1 ^ w1) | (slot->w2 ^ w2) |
           (slot->lens ^ lens)) == 0)
        break;
    }
    std::uint64_t shot = 0;
    const std::size_t shot_len = static_cast<std::size_t>(shot_e - shot_b);
    if (shot_len > 0 && (shot_len > 8 || !eight_digits(shot_b, shot_len, shot))) return false;
    const std::size_t time_len = static_cast<std::size_t>(time_e - time_b);
    // The one-pass parser reads the 16 bytes that end at the field's end.
    if (time_len > 0 && !(time_e - buffer >= 16 && parse_time_right_aligned(std::string_view(time_b, time_len), out.t)) &&
        !parse_time(std::string_view(time_b, time_len), out.t))
      return false;
    out.seq = slot->seq;
    out.flat = slot->flat;
    out.has_shot = shot_len > 0;
    out.shot = static_cast<std::uint32_t>(shot);  // at most 8 digits
    out.has_time = time_len > 0;
    return true;
  }

  // Sets the shot's bit; false (nothing changed) if it was set (a duplicate).
  static bool take_shot(SequenceShape& shape, std::uint32_t shot) {
    const std::size_t word = shot >> 6;
    if (word < shape.seen.size() && (shape.seen[word] >> (shot & 63)) & 1u) return false;
    if (word >= shape.seen.size()) shape.seen.resize(std::max(word + 1, 2 * shape.seen.size()), 0);
    shape.seen[word] |= std::uint64_t{1} << (shot & 63);
    return true;
  }

  static void track_time(TimeTrack& tr, const Decimal& t) {
    if (!tr.any) tr = {true, t, t};
    else {
      if (t.approx < tr.first.approx) tr.first = t;
      if (t.approx > tr.last.approx) tr.last = t;
    }
  }

  // Returns false (and changes nothing) unless the row is a plain valid row of the table.
  [[gnu::always_inline]] bool fast_row(const char* b, const char* e, std::uint64_t commas) {
    FastRow r;
    if (!fast_match(b, e, commas, begin_, r)) return false;
    if (r.has_shot && !take_shot(shapes_[static_cast<std::size_t>(r.seq)], r.shot)) return false;
    // Accepted: the same bookkeeping as row().
    auto& rows = result_.counts.rows;
    ++rows.read;
    ++rows.used;
    *flat_cell_[static_cast<std::size_t>(r.flat)] += 1.0;
    if (r.has_time) track_time(times_[static_cast<std::size_t>(r.seq)], r.t);
    return true;
  }

  std::string where(int column) const {
    std::string w = "line " + std::to_string(line_no_);
    if (column >= 0)
      w += ", column " + std::to_string(column + 1) + " (" +
           column_names_[static_cast<std::size_t>(column)] + ")";
    return w;
  }

  void too_many_fields(int ncols) {
    reject(row_reason::kTooManyFields, -1,
           "the row has more fields than the header's " + std::to_string(ncols));
  }

  // A rejected row: throw (policy error) or count it (policy skip).
  void reject(const char* reason, int column, const std::string& detail) {
    if (options_.bad_rows == BadRowPolicy::error) throw InputError(file_, where(column), detail);
    count_reason(result_.counts.rows, reason);
  }

  void row(const char* b, const char* e, std::uint64_t commas, bool short_line) {
    auto& rows = result_.counts.rows;
    ++rows.read;
    const int seq_col = seq_col_, shot_col = shot_col_, time_col = time_col_;
    const int ncols = static_cast<int>(roles_.size());
    // Split at commas; fields missing at the end of a short row stay empty.
    const char** fb = field_begin_.data();
    const char** fe = field_end_.data();
    int col = 0;
    const char* start = b;
    if (short_line) {
      const std::size_t len = static_cast<std::size_t>(e - b);  // < 64
      for (std::uint64_t m = commas & ((std::uint64_t{1} << len) - 1); m != 0; m &= m - 1) {
        if (col >= ncols - 1) return too_many_fields(ncols);
        const char* c = b + __builtin_ctzll(m);
        fb[col] = start;
        fe[col] = c;
        ++col;
        start = c + 1;
      }
      fb[col] = start;
      fe[col] = e;
      ++col;
    } else {
      for (const char* q = b;; ++q) {
        if (q == e || *q == ',') {
          if (col >= ncols) return too_many_fields(ncols);
          fb[col] = start;
          fe[col] = q;
          ++col;
          if (q == e) break;
          start = q + 1;
        }
      }
    }
    for (; col < ncols; ++col) fb[col] = fe[col] = e;
    auto field = [&](int c) {
      return c < 0 ? std::string_view()
                   : std::string_view(fb[c], static_cast<std::size_t>(fe[c] - fb[c]));
    };
    const std::string_view seq_f = field(seq_col), shot_f = field(shot_col), time_f = field(time_col);

    const int s = names_->find(seq_f);
    if (s < 0)
      return reject(row_reason::kUnknownSequence, seq_col,
                    "sequence '" + std::string(seq_f) + "' is not in the protocol");
    auto& shape = shapes_[static_cast<std::size_t>(s)];

    std::uint64_t shot = 0;
    const bool has_shot = !shot_f.empty();
    if (has_shot) {
      bool ok = shot_f.size() <= 10;
      if (shot_f.size() <= 8) {
        ok = eight_digits(shot_f.data(), shot_f.size(), shot);
      } else {
        for (char ch : shot_f) {
          ok = ok && ch >= '0' && ch <= '9';
          shot = shot * 10 + static_cast<std::uint64_t>(ch - '0');
        }
      }
      if (!ok || shot >= (std::uint64_t{1} << 32))
        return reject(row_reason::kMalformedShot, shot_col,
                      "shot '" + std::string(shot_f) + "' is not a non-negative integer below 2^32");
      const std::size_t word = static_cast<std::size_t>(shot >> 6);
      if (word < shape.seen.size() && (shape.seen[word] >> (shot & 63)) & 1u)
        return reject(row_reason::kDuplicatedShot, shot_col,
                      "shot " + std::to_string(shot) + " of sequence '" + std::string(seq_f) +
                          "' appears a second time");
    }
    Decimal t;
    const bool has_time = !time_f.empty();
    if (has_time) {
      if (!parse_time(time_f, t))
        return reject(row_reason::kMalformedTime, time_col,
                      "time_s '" + std::string(time_f) + "' is not a finite number");
    }

    const int n = shape.steps;
    const int nres = static_cast<int>(result_columns_.size());
    bool going = true;
    std::size_t bits = 0;
    int len = 0;
    long photon_counts = 0;  // tallied only if the row is used: a rejected row reports nothing
    for (int k = 0; k < std::max(n, nres); ++k) {
      const int rc = k < nres ? result_columns_[static_cast<std::size_t>(k)] : -1;
      const std::string_view f = field(rc);
      if (k >= n) {
        if (!f.empty())
          return reject(row_reason::kResultBeyondSteps, rc,
                        "result '" + std::string(f) + "' for step " + std::to_string(k + 1) +
                            ", but sequence '" + std::string(seq_f) + "' has " +
                            std::to_string(n) + " steps");
        continue;
      }
      if (!going) {
        if (!f.empty())
          return reject(row_reason::kResultAfterEnd, rc,
                        "result '" + std::string(f) + "' at step " + std::to_string(k + 1) +
                            ", but the shot ended with bright at step " + std::to_string(len));
        continue;
      }
      if (f.empty()) {
        if (rc < 0)
          return reject(row_reason::kMissingResult, -1,
                        "sequence '" + std::string(seq_f) + "' reaches step " +
                            std::to_string(k + 1) + " but the header has no r" +
                            std::to_string(k + 1) + " column");
        return reject(row_reason::kMissingResult, rc,
                      "no result at step " + std::to_string(k + 1) + ", but the shot " +
                          (destructive_ ? "was dark at every earlier step" : "runs every step") +
                          " and must have gone on");
      }
      const int r = parse_result(f, threshold_);
      if (r == -2)
        throw InputError(file_, where(rc),
                         "photon count '" + std::string(f) +
                             "' but no threshold: set detection.threshold in the protocol or "
                             "give a threshold");
      if (r < 0)
        return reject(row_reason::kMalformedResult, rc,
                      "result '" + std::string(f) +
                          "' is neither dark, bright nor a non-negative integer count");
      if (f[0] >= '0' && f[0] <= '9') ++photon_counts;
      bits = (bits << 1) | static_cast<std::size_t>(r);
      ++len;
      if (r == 1 && destructive_) going = false;
    }
    const int cell = shape.code_to_cell[(std::size_t{1} << len) | bits];
    MACROREAL_CHECK(cell >= 0);

    // Accepted: count it and remember the shot and the time.
    result_.counts.sequences[static_cast<std::size_t>(s)].counts[static_cast<std::size_t>(cell)] += 1.0;
    ++rows.used;
    result_.photon_count_results += photon_counts;
    if (has_shot) {
      const std::size_t word = static_cast<std::size_t>(shot >> 6);
      if (word >= shape.seen.size()) shape.seen.resize(std::max(word + 1, 2 * shape.seen.size()), 0);
      shape.seen[word] |= std::uint64_t{1} << (shot & 63);
    }
    if (has_time) {
      auto& tr = times_[static_cast<std::size_t>(s)];
      if (!tr.any) tr = {true, t, t};
      else {
        if (t.approx < tr.first.approx) tr.first = t;
        if (t.approx > tr.last.approx) tr.last = t;
      }
    }
  }

  std::string file_;
  OutcomeTableOptions options_;
  std::optional<double> threshold_;
  bool destructive_ = true;
  OutcomeTableRead result_;
  std::vector<SequenceShape> shapes_;
  std::vector<TimeTrack> times_;
  std::unique_ptr<NameTable> names_;
  bool have_header_ = false;
  long line_no_ = 0;
  std::vector<int> roles_;
  int seq_col_ = -1, shot_col_ = -1, time_col_ = -1;
  std::vector<std::string> column_names_;
  std::vector<int> result_columns_;  // column of r(k+1)
  std::vector<const char*> field_begin_, field_end_;  // the current row's fields
  const char* begin_ = nullptr;                       // start of the buffer lines() reads
  FastTable fast_;
  std::vector<int> cell_offset_;    // per sequence: index of its first cell in flat_cell_
  std::vector<double*> flat_cell_;  // every cell's count, sequence by sequence
};

// ----------------------------------------------------------------------------------------
// A regular file cut into chunks for several threads. Chunk k holds the lines that start in
// [k * B, (k + 1) * B) bytes (B = block size), so the chunks tile the file at line starts
// and any thread can find its chunk's ends on its own: chunk k begins after the first '\n'
// at or after byte k * B - 1 (chunk 0 at byte 0) and ends after the first '\n' at or after
// byte (k + 1) * B - 1 (or at the end of the file).
class ChunkedFile {
 public:
  ChunkedFile(std::string path, int fd, std::uint64_t size, std::size_t block)
      : path_(std::move(path)), fd_(fd), size_(size), block_(block) {}

  std::size_t block() const { return block_; }
  long chunks() const { return static_cast<long>((size_ + block_ - 1) / block_); }

  // Reads chunk k into buf; [begin, end) are its lines, followed by kPadding readable
  // bytes (more of the file, or zeros at its end).
  void read(long k, std::vector<char>& buf, const char*& begin, const char*& end) const {
    const std::uint64_t from = k == 0 ? 0 : static_cast<std::uint64_t>(k) * block_ - 1;
    const std::size_t boundary = k == 0 ? block_ - 1 : block_;  // byte (k + 1) * B - 1
    std::size_t want = block_ + 4096, got = 0;
    for (;;) {
      if (buf.size() < want + kPadding) buf.resize(want + kPadding);
      const std::size_t searched = std::max(got, boundary);
      got += read_at(buf.data() + got, want - got, from + got);
      if (got < want) break;  // the end of the file
      // Stop once a '\n' at or after the boundary is in the buffer.
      if (got > searched && std::memchr(buf.data() + searched, '\n', got - searched)) break;
      want *= 2;  // a line longer than the read so far: read on
    }
    std::memset(buf.data() + got, 0, kPadding);
    std::size_t b = 0;
    if (k > 0) {
      const void* nl = std::memchr(buf.data(), '\n', std::min(got, boundary));
      b = nl ? static_cast<std::size_t>(static_cast<const char*>(nl) - buf.data()) + 1 : got;
    }
    std::size_t e = got;
    if (got > boundary)
      if (const void* nl = std::memchr(buf.data() + boundary, '\n', got - boundary))
        e = static_cast<std::size_t>(static_cast<const char*>(nl) - buf.data()) + 1;
    if (b >= e || (k > 0 && b > boundary)) b = e;  // no line starts in the chunk
    begin = buf.data() + b;
    end = buf.data() + e;
  }

 private:
  // pread until n bytes or the end of the file; the number of bytes read.
  std::size_t read_at(char* p, std::size_t n, std::uint64_t offset) const {
    std::size_t done = 0;
    while (done < n) {
      const ssize_t r = ::pread(fd_, p + done, n - done, static_cast<off_t>(offset + done));
      if (r < 0 && errno == EINTR) continue;
      if (r < 0) throw InputError(path_, "", "read error: " + std::string(std::strerror(errno)));
      if (r == 0) break;
      done += static_cast<std::size_t>(r);
    }
    return done;
  }

  std::string path_;
  int fd_;
  std::uint64_t size_;
  std::size_t block_;
};

// Chunks 0, 1, ... are read serially until the header is known; the rest go to `threads`
// lanes (the calling thread and threads - 1 more), each taking the next chunk not yet
// taken. A lane tallies a chunk, leaves the tally in a ring of kWindow slots and merges
// whatever chunks are complete in file order; a lane waits before a chunk that would run
// more than kWindow chunks ahead of the merge, so memory stays bounded (kWindow tallies and
// one buffer per lane). A chunk that is not plain, or whose shots collide, is re-read and
// given to the general path during its merge, in order, so messages, line numbers and
// skip counts are those of one thread reading the whole file; the first exception stops
// every lane and is rethrown.
class ParallelTableRead {
 public:
  ParallelTableRead(const ChunkedFile& file, CsvParser& parser, int threads)
      : file_(file), parser_(parser), threads_(threads), ring_(kWindow) {}

  void run() {
    const long n = file_.chunks();
    std::vector<char> buf;
    const char *b, *e;
    while (next_merge_ < n && !parser_.have_header()) {  // the header, serially
      file_.read(next_merge_, buf, b, e);
      parser_.lines(b, e);
      ++next_merge_;
    }
    if (!parser_.fast_enabled()) {  // no fast path (another column order): one thread
      for (; next_merge_ < n; ++next_merge_) {
        file_.read(next_merge_, buf, b, e);
        parser_.lines(b, e);
      }
      return;
    }
    if (next_merge_ >= n) return;
    next_take_ = next_merge_;
    std::vector<std::thread> workers;
    try {
      for (int t = 1; t < threads_; ++t) workers.emplace_back([this] { lane(); });
    } catch (const std::system_error&) {  // no more threads to be had: fewer lanes
    }
    lane();
    for (auto& w : workers) w.join();
    if (error_) std::rethrow_exception(error_);
    MACROREAL_CHECK(next_merge_ == n);
  }

 private:
  static constexpr long kWindow = 8;

  void lane() {
    try {
      std::vector<char> buf;
      const char *b, *e;
      const long n = file_.chunks();
      for (;;) {
        long k;
        {
          std::unique_lock<std::mutex> lock(mutex_);
          ready_.wait(lock, [&] { return failed_ || next_take_ < next_merge_ + kWindow; });
          if (failed_ || next_take_ >= n) return;
          k = next_take_++;
        }
        auto tally = std::make_unique<CsvParser::ChunkTally>();
        tally->shots.reserve(file_.block() / 16);
        file_.read(k, buf, b, e);
        parser_.tally_chunk(b, e, *tally);
        std::unique_lock<std::mutex> lock(mutex_);
        ring_[static_cast<std::size_t>(k % kWindow)] = std::move(tally);
        if (merging_) continue;  // the merging lane will take it
        merging_ = true;
        for (;;) {
          auto& slot = ring_[static_cast<std::size_t>(next_merge_ % kWindow)];
          if (failed_ || !slot) break;
          auto c = std::move(slot);
          const long m = next_merge_;
          lock.unlock();
          if (!parser_.merge_chunk(*c)) {  // the general path, after the chunks before it
            file_.read(m, merge_buf_, b, e);
            parser_.lines(b, e);
          }
          lock.lock();
          ++next_merge_;
          ready_.notify_all();
        }
        merging_ = false;
      }
    } catch (...) {
      std::lock_guard<std::mutex> lock(mutex_);
      if (!failed_) error_ = std::current_exception();
      failed_ = true;
      ready_.notify_all();
    }
  }

  const ChunkedFile& file_;
  CsvParser& parser_;
  int threads_;
  std::mutex mutex_;
  std::condition_variable ready_;
  long next_merge_ = 0;  // the next chunk to merge
  long next_take_ = 0;   // the next chunk no lane has taken
  bool merging_ = false;
  bool failed_ = false;
  std::exception_ptr error_;
  std::vector<std::unique_ptr<CsvParser::ChunkTally>> ring_;
  std::vector<char> merge_buf_;  // re-read chunks (used by the merging lane only)
};

}  // namespace

OutcomeTableRead parse_outcome_table(const std::string& text, const std::string& file_label,
                                     const Protocol& protocol, const OutcomeTableOptions& options) {
  CsvParser parser(file_label, protocol, options);
  std::string padded = text;
  padded.append(kPadding, '\0');
  parser.lines(padded.data(), padded.data() + text.size());
  return parser.finish();
}

OutcomeTableRead read_outcome_table(const std::string& path, const Protocol& protocol,
                                    const OutcomeTableOptions& options) {
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(path.c_str(), "rb"), &std::fclose);
  if (!f) throw InputError(path, "", "cannot open the outcome table: " + std::string(std::strerror(errno)));
  CsvParser parser(path, protocol, options);
  {
    // A regular file of more than two chunks is read in chunks by several threads.
    const int fd = ::fileno(f.get());
    struct stat st {};
    const std::size_t chunk = std::max<std::size_t>(options.block_bytes, 64);
    if (options.threads > 1 && ::fstat(fd, &st) == 0 && S_ISREG(st.st_mode) &&
        static_cast<std::uint64_t>(st.st_size) > 2 * chunk) {
      const ChunkedFile file(path, fd, static_cast<std::uint64_t>(st.st_size), chunk);
      ParallelTableRead(file, parser, options.threads).run();
      return parser.finish();
    }
  }
  const std::size_t block = std::max<std::size_t>(options.block_bytes, 4096);
  std::vector<char> buf(block + kPadding);
  std::size_t capacity = block;
  std::size_t carry = 0;  // bytes of an unfinished line at the start of buf
  for (;;) {
    if (capacity - carry < block / 2) {  // a line longer than half a block
      capacity *= 2;
      buf.resize(capacity + kPadding);
    }
    const std::size_t got = std::fread(buf.data() + carry, 1, capacity - carry, f.get());
    const std::size_t have = carry + got;
    std::memset(buf.data() + have, 0, kPadding);
    if (got == 0) {
      if (std::ferror(f.get())) throw InputError(path, "", "read error");
      parser.lines(buf.data(), buf.data() + have);  // a last line without '\n'
      break;
    }
    // Complete lines end at the last '\n' of the buffer.
    std::size_t last = have;
    while (last > 0 && buf[last - 1] != '\n') --last;
    if (last == 0) {
      carry = have;
      continue;
    }
    parser.lines(buf.data(), buf.data() + last);
    carry = have - last;
    std::memmove(buf.data(), buf.data() + last, carry);
  }
  return parser.finish();
}

// ----------------------------------------------------------------------------------------
OutcomeTableRead parse_counts_json(const nlohmann::json& doc, const std::string& file_label,
                                   const Protocol& protocol, const OutcomeTableOptions& options) {
  OutcomeTableRead r;
  r.counts = empty_counts(protocol);
  r.time_ranges.assign(r.counts.sequences.size(), ShotTimeRange{});
  auto shapes = shapes_of(r.counts);
  const bool destructive = protocol.readout == Readout::destructive;
  auto& rows = r.counts.rows;

  if (!doc.is_object()) throw InputError(file_label, "", "a counts file is a JSON object");
  if (!doc.contains("format") || !doc["format"].is_string() ||
      doc["format"].get<std::string>() != "macroreal-counts/1")
    throw InputError(file_label, "format", "format must be \"macroreal-counts/1\"");
  for (const auto& [key, value] : doc.items())
    if (key != "format" && key != "counts" && key != "title" && key != "comment")
      throw InputError(file_label, key, "unknown field");
  if (!doc.contains("counts") || !doc["counts"].is_object())
    throw InputError(file_label, "counts", "counts must be an object of sequences");

  auto reject = [&](const char* reason, const std::string& where, const std::string& msg, long n) {
    if (options.bad_rows == BadRowPolicy::error) throw InputError(file_label, where, msg);
    rows.read += n;
    count_reason(rows, reason, n);
  };

  for (const auto& [seq_name, cells] : doc["counts"].items()) {
    const std::string seq_where = "counts." + seq_name;
    if (!cells.is_object())
      throw InputError(file_label, seq_where, "must be an object of outcome keys -> counts");
    int s = -1;
    for (std::size_t i = 0; i < r.counts.sequences.size(); ++i)
      if (r.counts.sequences[i].name == seq_name) s = static_cast<int>(i);
    for (const auto& [key, value] : cells.items()) {
      const std::string where = seq_where + "." + key;
      long n = 0;
      bool count_ok = false;
      if (value.is_number_unsigned()) {
        n = static_cast<long>(value.get<std::uint64_t>());
        count_ok = true;
      } else if (value.is_number_integer() && value.get<std::int64_t>() >= 0) {
        n = static_cast<long>(value.get<std::int64_t>());
        count_ok = true;
      }
      if (!count_ok) {
        reject(row_reason::kMalformedCount, where,
               "count " + value.dump() + " is not a non-negative integer", 1);
        continue;
      }
      if (s < 0) {
        reject(row_reason::kUnknownSequence, where,
               "sequence '" + seq_name + "' is not in the protocol", n);
        continue;
      }
      const auto& shape = shapes[static_cast<std::size_t>(s)];
      // Walk the detector results of the key.
      std::vector<std::string> tokens;
      for (std::size_t p = 0;;) {
        const std::size_t c = key.find(',', p);
        tokens.push_back(key.substr(p, c == std::string::npos ? std::string::npos : c - p));
        if (c == std::string::npos) break;
        p = c + 1;
      }
      const char* bad_reason = nullptr;
      std::string bad_msg;
      std::size_t bits = 0;
      int len = 0;
      bool going = true;
      for (std::size_t k = 0; k < tokens.size() && !bad_reason; ++k) {
        const std::string& t = tokens[k];
        if (static_cast<int>(k) >= shape.steps) {
          bad_reason = row_reason::kResultBeyondSteps;
          bad_msg = "result for step " + std::to_string(k + 1) + ", but the sequence has " +
                    std::to_string(shape.steps) + " steps";
        } else if (!going) {
          bad_reason = row_reason::kResultAfterEnd;
          bad_msg = "result '" + t + "' at step " + std::to_string(k + 1) +
                    ", but the shot ended with bright at step " + std::to_string(len);
        } else if (t != "dark" && t != "bright") {
          bad_reason = row_reason::kMalformedResult;
          bad_msg = "result '" + t + "' at step " + std::to_string(k + 1) +
                    " is neither dark nor bright";
        } else {
          const int b = t == "bright" ? 1 : 0;
          bits = (bits << 1) | static_cast<std::size_t>(b);
          ++len;
          if (b == 1 && destructive) going = false;
        }
      }
      if (!bad_reason && going && len < shape.steps) {
        bad_reason = row_reason::kMissingResult;
        bad_msg = "the key ends at step " + std::to_string(len) + ", but the shot " +
                  (destructive ? "was dark at every step" : "runs every step") +
                  " and must have gone on to step " + std::to_string(len + 1);
      }
      if (bad_reason) {
        reject(bad_reason, where, bad_msg, n);
        continue;
      }
      const int cell = shape.code_to_cell[(std::size_t{1} << len) | bits];
      MACROREAL_CHECK(cell >= 0);
      r.counts.sequences[static_cast<std::size_t>(s)].counts[static_cast<std::size_t>(cell)] +=
          static_cast<double>(n);
      rows.read += n;
      rows.used += n;
    }
  }
  return r;
}

OutcomeTableRead read_counts_json(const std::string& path, const Protocol& protocol,
                                  const OutcomeTableOptions& options) {
  std::ifstream in(path);
  if (!in) throw InputError(path, "", "cannot open the counts file");
  nlohmann::json doc;
  try {
    doc = nlohmann::json::parse(in);
  } catch (const nlohmann::json::parse_error& e) {
    throw InputError(path, "", std::string("not valid JSON: ") + e.what());
  }
  return parse_counts_json(doc, path, protocol, options);
}

}  // namespace macroreal
