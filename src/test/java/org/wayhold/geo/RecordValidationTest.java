package org.wayhold.geo;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import org.junit.jupiter.api.Test;

class RecordValidationTest {

    @Test
    void geodeticRejectsOutOfRangeValuesInsteadOfWrappingThem() {
        assertThatThrownBy(() -> new Geodetic(90.000001, 0.0, 0.0)).isInstanceOf(IllegalArgumentException.class)
                .hasMessage("latDeg: must be within [-90, 90] degrees, was 90.000001");
        assertThatThrownBy(() -> new Geodetic(0.0, -180.5, 0.0)).hasMessageContaining("lonDeg").hasMessageContaining("-180.5");
        assertThatThrownBy(() -> new Geodetic(0.0, Double.NaN, 0.0)).hasMessageContaining("lonDeg");
        assertThatThrownBy(() -> new Geodetic(0.0, 0.0, Double.POSITIVE_INFINITY)).hasMessageContaining("altM");
    }

    @Test
    void geodeticAcceptsTheClosedLimits() {
        assertThat(new Geodetic(-90.0, 180.0, -1000.0).lonDeg()).isEqualTo(180.0);
        assertThat(new Geodetic(90.0, -180.0, 0.0).latDeg()).isEqualTo(90.0);
    }

    @Test
    void cartesianRecordsRejectNonFiniteCoordinates() {
        assertThatThrownBy(() -> new Ecef(0.0, Double.NaN, 0.0)).hasMessageContaining("yM");
        assertThatThrownBy(() -> new Enu(0.0, 0.0, Double.NEGATIVE_INFINITY)).hasMessageContaining("upM");
    }

    @Test
    void horizontalDistanceIgnoresUp() {
        // Exact hand case: a 3-4-5 triangle.
        assertThat(new Enu(3.0, -4.0, 100.0).horizontalM()).isEqualTo(5.0);
    }
}
