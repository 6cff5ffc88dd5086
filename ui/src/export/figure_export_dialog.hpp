// Exporting a figure: which plot of the section, format (PNG at a DPI, SVG,
// PDF), a LOOK.md preset or a custom size, font and size, greyscale, whether
// the moderator slider's value is marked (off: no slider in the figure),
// caption; a live preview; save (the dialog stays open, so several files can
// be saved), copy to the clipboard, or keep the figure in the project. It
// starts on the plot chosen last for the project (this session). The settings start from the analysis's stored ones and
// are stored back (one undoable edit) when the user exports.
#pragma once

#include <QDialog>
#include <QList>
#include <QStringList>

#include "export/figure_exporter.hpp"
#include "moderato/project/project.hpp"

class QCheckBox;
class QComboBox;
class QDialogButtonBox;
class QDoubleSpinBox;
class QFontComboBox;
class QFormLayout;
class QLabel;
class QLineEdit;
class QPushButton;
class QSpinBox;
class QTimer;

namespace moderato::ui {

class FigureSource;
class ProjectDocument;

class FigureExportDialog : public QDialog {
    Q_OBJECT
public:
    FigureExportDialog(FigureSource* source, ProjectDocument* doc, const QString& analysisId, const QString& caption,
                       QWidget* parent = nullptr);
    // Several figures (a section with more than one plot): a combo picks one.
    FigureExportDialog(const QList<FigureSource*>& sources, ProjectDocument* doc, const QString& analysisId,
                       const QString& caption, QWidget* parent = nullptr);

    // One caption per figure, in the figures' order: the caption box shows
    // the chosen figure's and follows the figure choice until the user edits it.
    void setFigureCaptions(const QStringList& captions);

    // What the dialog shows now.
    FigureSettings settings() const;
    FigureFormat format() const;
    FigureSource* currentSource() const;
    QString captionText() const;  // empty when the caption is off

    // Writes the chosen figure to `path` (a figure extension in the path picks
    // the format; without one the chosen format's is added) and stores the
    // settings in the analysis. False, with the reason in statusText(), when
    // it fails.
    bool exportTo(const QString& path);
    // Puts the figure (as an image at the chosen size and DPI) on the clipboard
    // and stores the settings.
    bool copyToClipboard();
    // Adds the chosen plot to the project's figures (one undoable edit, with
    // the settings). False when it is already there.
    bool keepInProject();
    // The last outcome ("Saved …", or the error naming the file).
    QString statusText() const;
    QString lastSavedPath() const { return lastSavedPath_; }
    // What Save… offers: the analysis's name and the plot ("nitrogen ×
    // soil moisture", Effect plot, PNG: "nitrogen-soil-moisture-effect.png"),
    // in the project's folder (an unsaved project: the folder saved to last).
    QString suggestedFileName() const;
    QString saveFolder() const;

Q_SIGNALS:
    // Save… wrote `path`; the dialog stays open for the next file.
    void figureSaved(const QString& path);

private:
    // The dialog's parts: the form (the figure's rows, then its look), the
    // preview, the buttons, then the connections.
    void build();
    void createFigureRows(QFormLayout* form);
    void createLookRows(QFormLayout* form);
    QWidget* createPreview();
    QDialogButtonBox* createButtons();
    void connectSignals(QDialogButtonBox* buttons);
    void loadSettings(const FigureSettings& s);
    void presetChosen();
    void sizeEdited();
    void formatChosen();
    void schedulePreview();
    void updatePreview();
    void updatePixelReadout();
    void saveClicked();
    void storeSettings();
    void setStatus(const QString& text, bool error);

    QList<FigureSource*> sources_;
    ProjectDocument* doc_;
    QString analysisId_;
    QString caption_;
    QStringList captions_;    // per figure; empty: caption_ for all
    int captionFigure_ = -1;  // the figure whose caption the box shows
    QString lastSavedPath_;

    QComboBox* figure_ = nullptr;
    QComboBox* format_ = nullptr;
    QComboBox* preset_ = nullptr;
    QDoubleSpinBox* width_ = nullptr;
    QDoubleSpinBox* height_ = nullptr;
    QSpinBox* dpi_ = nullptr;
    QLabel* pixels_ = nullptr;
    QFontComboBox* font_ = nullptr;
    QDoubleSpinBox* fontSize_ = nullptr;
    QCheckBox* greyscale_ = nullptr;
    QCheckBox* markSlider_ = nullptr;
    QCheckBox* captionOn_ = nullptr;
    QLineEdit* captionText_ = nullptr;
    QLabel* preview_ = nullptr;
    QLabel* status_ = nullptr;
    QPushButton* save_ = nullptr;
    QPushButton* copy_ = nullptr;
    QPushButton* keep_ = nullptr;
    QTimer* previewTimer_ = nullptr;
    bool loading_ = false;
};

}  // namespace moderato::ui
