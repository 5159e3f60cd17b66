# downgradient: one static binary in an empty image.
#   docker build -t downgradient .
#   docker run --rm -p 8080:8080 downgradient
FROM golang:1.26 AS build
WORKDIR /src
COPY go.mod go.sum ./
RUN go mod download
COPY . .
ARG VERSION=dev
RUN CGO_ENABLED=0 go build -trimpath -ldflags "-s -w -X main.version=${VERSION}" -o /out/downgradient .

FROM scratch
COPY --from=build /out/downgradient /downgradient
USER 65534:65534
ENV ADDR=:8080
EXPOSE 8080
HEALTHCHECK --interval=30s --timeout=5s --start-period=5s --retries=3 CMD ["/downgradient", "-healthcheck"]
ENTRYPOINT ["/downgradient"]
