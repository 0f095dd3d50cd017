#!/bin/sh
# Regenerates the workstation screenshots under Xvfb (needs xvfb-run and
# ImageMagick's import/convert). Run from the repository root:
#   sh docs/screenshots/make.sh
# ONLY='calibration*' limits it to the matching names.
set -eu
out=docs/screenshots
bin=${WHORL_BIN:-/tmp/whorl-screens}
demo=${WHORL_DEMO_DIR:-/tmp/whorl-screens-demo}
go build -o "$bin" ./cmd/whorl
export LANG=en_US.UTF-8 WHORL_USER="analyst-2b" WHORL_ROLE=level2
shot() { # name size desk theme [extra env]
  name=$1 size=$2 desk=$3 theme=$4; shift 4
  case "$name" in ${ONLY:-*}) ;; *) return 0 ;; esac
  xvfb-run -a -s "-screen 0 ${size}x24" sh -c "env $* '$bin' gui --demo-dir '$demo' --size '$size' --desk '$desk' --theme '$theme' >/dev/null 2>&1 & p=\$!; sleep ${WAIT:-12}; import -window root '$out/$name.png'; kill \$p"
  convert "$out/$name.png" -strip -colors 256 "$out/$name.png"
}
for size in 1366x768 1920x1080; do
  shot "review-dark-$size" "$size" review dark
  shot "calibration-dark-$size" "$size" calibration dark
  shot "model-dark-$size" "$size" model dark
  shot "report-dark-$size" "$size" report dark
  shot "review-light-$size" "$size" review light
  shot "about-dark-$size" "$size" review dark WHORL_GUI_ABOUT=1
done
shot "signin-light-1366x768" 1366x768 review light WHORL_USER=
ls -l "$out"/*.png
