// Delimited text read in chunks of rows with bounded memory, for fits of
// files larger than memory. The same reader as read_csv (csv.hpp) does the
// work, so every chunk holds exactly what read_csv's table holds for those
// rows: the same kinds, numbers, level codes and text, lines and errors.
#pragma once

#include <cstddef>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

// A chunk of consecutive rows of the file: every column, the rows' lines in
// row_lines, the file in source. Codes of a categorical column are the file's
// own (in order of first appearance, the same in every chunk and pass).
using CsvChunkFn = std::function<void(const Table& chunk)>;

class CsvStream {
public:
    // A file; nothing is read until scan().
    CsvStream(std::string path, CsvOptions options, std::size_t chunk_rows = 65536);
    // Text held in memory (`name` is used in messages), for tests.
    static CsvStream from_text(std::string text, std::string name, CsvOptions options, std::size_t chunk_rows);
    ~CsvStream();
    CsvStream(CsvStream&&) noexcept;
    CsvStream& operator=(CsvStream&&) noexcept;

    // The first pass: finds each column's kind (categorical when any cell is
    // text, as read_csv decides) and its levels, handing every chunk to `fn`
    // as it goes. The kinds are final only at the end: when a column meets
    // its first text after numbers were handed out for it, `restarted` is
    // called and the pass starts again from the first row (read_csv reads
    // such a file twice as well); until then a column that will be
    // categorical but so far only had missing cells comes as numeric (NaN).
    // Throws InputError (file, line, column) for whatever read_csv refuses.
    void scan(const CsvChunkFn& fn, const std::function<void()>& restarted = {});

    // A later pass, after scan(): chunks with the schema's kinds and all of
    // each categorical column's levels. Throws InputError naming the file
    // when it changed since scan() (size, modification time or identity, or
    // cells that no longer read as the first pass read them). With `keep`,
    // the other columns are skipped (scan() read and checked them; the file
    // is the same): they come as numeric columns of missing cells.
    void read(const CsvChunkFn& fn, const std::vector<std::string>* keep = nullptr);

    // The columns found by scan(), with no rows: names, kinds, every level,
    // the first cell of text, text_as_missing counts and examples.
    const Table& schema() const;
    const std::string& name() const;  // the file (or the text's name), for messages
    std::size_t rows() const;         // data rows in the file
    std::size_t passes() const;       // passes over the file so far (a restart counts)
    std::size_t chunk_rows() const;
    std::size_t largest_chunk() const;  // rows in the largest chunk handed out

    // Tests: the reader's block size and thread count (the chunks do not depend on them).
    void set_tuning(const detail::CsvTuning& tuning);

private:
    struct State;
    CsvStream();
    std::unique_ptr<State> s_;
};

}  // namespace moderato
