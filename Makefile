# Faultline: two entry points for a fresh Debian machine.
#   make run   installs what the desktop program needs, builds it and opens
#              it on the built-in demo scene
#   make test  installs what the tests need, then checks formatting, vets
#              and runs every test, among them (cmd/app) the desktop window
#              opened under Xvfb, captured and checked not to be blank

SHELL := /bin/bash
export PATH := $(PATH):/usr/local/go/bin
GO ?= go

# Fyne's OpenGL/X11 build needs these headers (Debian package names).
GUI_PKGS  := gcc pkg-config libgl1-mesa-dev libxcursor-dev libxrandr-dev libxinerama-dev libxi-dev libxxf86vm-dev
# Tests: a headless X server for the window capture, and the outside
# references the tests compare with (gemmi's scattering factors, Pillow,
# numpy, ImageMagick for inspecting captures), and Slurm with munge for the
# one-node cluster the sweep test starts (tests/slurmcluster_test.go; the
# daemons run as root, as make test does in CI); tifffile, mrcfile and
# hyperspy read and write the micrograph and image files of the tests.
TEST_PKGS := xvfb xauth python3-gemmi python3-pil python3-numpy imagemagick slurm-wlm munge \
             python3-tifffile python3-mrcfile python3-hyperspy

SUDO := $(shell [ "$$(id -u)" = 0 ] || echo sudo)

.PHONY: run test deps test-deps build check-format vet unit bench

# Install the Debian packages that are missing (apt-get update only when
# something is missing).
define apt_install
	@missing=""; for p in $(1); do dpkg-query -W -f='$${Status}' $$p 2>/dev/null | grep -q "install ok installed" || missing="$$missing $$p"; done; \
	if [ -n "$$missing" ]; then \
		echo "installing:$$missing"; \
		$(SUDO) apt-get update -qq && DEBIAN_FRONTEND=noninteractive $(SUDO) apt-get install -y -qq $$missing; \
	fi
endef

deps:
	$(call apt_install,$(GUI_PKGS))

test-deps: deps
	$(call apt_install,$(TEST_PKGS))

build: deps
	$(GO) build -o bin/faultline-app ./cmd/app
	CGO_ENABLED=0 $(GO) build -o bin/faultline ./cmd/faultline

run: build
	./bin/faultline-app

test: test-deps check-format vet unit

check-format:
	@out="$$(gofmt -l .)"; if [ -n "$$out" ]; then echo "gofmt would change:"; echo "$$out"; exit 1; fi

vet:
	$(GO) vet ./...

unit:
	CGO_ENABLED=0 $(GO) build -o /dev/null ./cmd/faultline
	$(GO) test ./...

bench:
	$(GO) test -run XXX -bench . -benchtime 5x ./sim/ ./tests/
