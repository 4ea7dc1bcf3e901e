# wayhold's HTTP service in a container.
#
#   docker build --build-arg BUILD_COMMIT=$(git rev-parse --short=12 HEAD) -t wayhold .
#   docker run -p 8470:8470 -v wayhold-data:/var/lib/wayhold \
#     -e WAYHOLD_WRITE_TOKENS=<a long random token> wayhold
#
# The service listens on all interfaces inside the container, which wayhold refuses without write
# tokens: give WAYHOLD_WRITE_TOKENS (and WAYHOLD_READ_TOKENS to guard reads), or append --insecure to
# the command on a trusted network. The journal lives on the volume /var/lib/wayhold; stop the
# container with SIGTERM (docker stop) so that it writes its last snapshot.
#
# .ci/dockerfile-steps.sh runs the build stage's steps as plain commands and starts the result, so this
# file is checked by CI even where no container engine runs: keep one instruction per line (a
# continuation with \ is fine), exec-form ENTRYPOINT and CMD, and no quotes or commas inside their items.

# ---- build: the fat jar from the sources (the tests run in CI, not here) ----
FROM maven:3.9-eclipse-temurin-17 AS build
ARG BUILD_COMMIT=unknown
WORKDIR /src
COPY pom.xml ./
COPY .mvn .mvn
COPY openapi.yaml ./
COPY src/main src/main
RUN mvn -B -ntp -q -DskipTests -Dbuild.commit=${BUILD_COMMIT} package

# ---- run: a JRE, a user of its own, the journal on a volume ----
FROM eclipse-temurin:17-jre
RUN useradd --system --user-group --uid 10001 --home-dir /var/lib/wayhold --no-create-home wayhold \
    && mkdir -p /var/lib/wayhold /etc/wayhold \
    && chown wayhold:wayhold /var/lib/wayhold
COPY --from=build /src/target/wayhold.jar /opt/wayhold/wayhold.jar
COPY deploy/healthcheck.sh /opt/wayhold/healthcheck.sh
COPY config/wayhold.yaml /etc/wayhold/wayhold.yaml
VOLUME ["/var/lib/wayhold"]
USER wayhold
WORKDIR /var/lib/wayhold
EXPOSE 8470
# Healthy while GET /health answers 200: the service takes writes (503 while the journal cannot write).
# Set WAYHOLD_PORT when the command is given another --port.
HEALTHCHECK --interval=30s --timeout=5s --start-period=30s --retries=3 CMD ["/opt/wayhold/healthcheck.sh"]
ENTRYPOINT ["java", "-jar", "/opt/wayhold/wayhold.jar"]
CMD ["serve", "--config", "/etc/wayhold/wayhold.yaml", "--data", "/var/lib/wayhold", "--bind", "0.0.0.0", "--port", "8470"]
