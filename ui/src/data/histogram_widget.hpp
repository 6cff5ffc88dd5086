// A small painted bar chart for the column summary: the histogram of a
// numeric column (bins from core) or the count of each level of a
// categorical one. Draws only what it is given.
#pragma once

#include <QStringList>
#include <QWidget>
#include <vector>

namespace moderato::ui {

class HistogramWidget : public QWidget {
    Q_OBJECT
public:
    explicit HistogramWidget(QWidget* parent = nullptr);

    // Equal-width bins: edges.size() == counts.size() + 1.
    void setHistogram(const std::vector<double>& edges, const std::vector<std::size_t>& counts);
    // One bar per level.
    void setLevels(const QStringList& levels, const std::vector<std::size_t>& counts);
    void clear();

    const std::vector<std::size_t>& counts() const { return counts_; }
    QSize sizeHint() const override { return {260, 130}; }
    QSize minimumSizeHint() const override { return {160, 100}; }

protected:
    void paintEvent(QPaintEvent* event) override;

private:
    std::vector<double> edges_;
    std::vector<std::size_t> counts_;
    QStringList levels_;
};

}  // namespace moderato::ui
