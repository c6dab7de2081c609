# syntax=docker/dockerfile:1
# Build a static wardload binary (pure Go: modernc SQLite needs no cgo),
# then copy it into a minimal image with CA certificates and tzdata.
FROM golang:1.26 AS build
WORKDIR /src
COPY go.mod go.sum ./
RUN go mod download
COPY . .
ARG VERSION=dev
RUN CGO_ENABLED=0 go build -trimpath -tags timetzdata -ldflags "-s -w -X main.version=${VERSION}" -o /out/wardload ./cmd/wardload \
 && mkdir -p /out/data

# distroless/static carries CA certificates and /usr/share/zoneinfo, which
# wardload needs for ward time zones (the binary also embeds tzdata via
# -tags timetzdata); it runs as an unprivileged user.
FROM gcr.io/distroless/static-debian12:nonroot
COPY --from=build /out/wardload /usr/local/bin/wardload
# The SQLite data directory must be writable by the nonroot user (65532).
COPY --from=build --chown=65532:65532 /out/data /data
WORKDIR /data
ENV WARDLOAD_DATA_DIR=/data
EXPOSE 8080
ENTRYPOINT ["/usr/local/bin/wardload"]
CMD ["serve", "--addr", "0.0.0.0:8080"]
