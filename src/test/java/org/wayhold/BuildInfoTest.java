package org.wayhold;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import org.junit.jupiter.api.Test;

/** The build properties as Maven fills them, and as classes that skipped Maven's resource step see them. */
class BuildInfoTest {

    private static BuildInfo read(String text) throws IOException {
        return BuildInfo.read(new ByteArrayInputStream(text.getBytes(StandardCharsets.ISO_8859_1)));
    }

    @Test
    void aFilteredFileGivesVersionAndCommit() throws IOException {
        BuildInfo b = read("version=1.2.0\ncommit=0123456789ab\ndirty=false\n");
        assertThat(b).isEqualTo(new BuildInfo("1.2.0", "0123456789ab", false));
        assertThat(b.describe()).isEqualTo("1.2.0 (commit 0123456789ab)");
        assertThat(read("version=1.2.0\ncommit=0123456789ab\ndirty=true\n").describe())
                .isEqualTo("1.2.0 (commit 0123456789ab-dirty)");
    }

    @Test
    void placeholdersLeftUnfilledAndMissingValuesReadUnknown() throws IOException {
        assertThat(read("version=${project.version}\ncommit=${build.commit}\ndirty=${build.dirty}\n"))
                .isEqualTo(new BuildInfo("unknown", "unknown", false));
        assertThat(BuildInfo.read(null).describe()).isEqualTo("unknown (commit unknown)");
        assertThat(read("version=1.2.0\ncommit=unknown\ndirty=true\n").describe()).isEqualTo("1.2.0 (commit unknown)");
    }

    @Test
    void theRunningBuildKnowsItsVersion() {
        // The test classes run on the classes Maven built, whose resources were filtered.
        assertThat(BuildInfo.current().version()).isNotEqualTo(BuildInfo.UNKNOWN);
    }
}
