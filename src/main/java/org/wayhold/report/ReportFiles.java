package org.wayhold.report;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

/** Writes the three report files into one directory. */
public final class ReportFiles {

    public static final String JSON = "report.json";
    public static final String CSV = "outages.csv";
    public static final String HTML = "report.html";

    private ReportFiles() {
    }

    /** Creates {@code dir} if needed and writes {@value #JSON}, {@value #CSV} and {@value #HTML} into it. */
    public static void write(ReportModel model, Path dir) throws IOException {
        Files.createDirectories(dir);
        JsonReport.write(model, dir.resolve(JSON));
        CsvReport.write(model, dir.resolve(CSV));
        HtmlReport.write(model, dir.resolve(HTML));
    }
}
