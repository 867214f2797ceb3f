#!/usr/bin/env bash
# A first session with ribbonmap, command by command. Run it from the
# repository root: bash examples/walkthrough.sh
# Every step prints what it shows; the files it writes go to a new temporary
# folder whose name the last line prints.
set -euo pipefail

cargo build --release --quiet
rm_bin=target/release/ribbonmap
work=$(mktemp -d)
step() { printf '\n### %s\n$ %s\n' "$1" "${*:2}"; "${@:2}"; }

step "Generate a 16-bit ripple-carry adder (inputs a[0..15], b[0..15]; outputs s[0..16])" \
    "$rm_bin" generate adder --width 16 --style ripple -o "$work/adder16.blif"

step "Look at it: ports, AND/XOR/MAJ nodes, depth" \
    "$rm_bin" inspect "$work/adder16.blif"

step "The default library: two- and three-input ribbon cells" \
    "$rm_bin" library show ribbon3

step "Map it onto ribbon3, prove the result, write structural Verilog" \
    "$rm_bin" map "$work/adder16.blif" --goal area -o "$work/adder16_ribbon3.v"

step "Check the written netlist against the original independently" \
    "$rm_bin" equiv "$work/adder16.blif" "$work/adder16_ribbon3.v" --lib ribbon3

step "The smallest full adder on ribbon3 (two outputs: sum 0x96, carry 0xE8)" \
    "$rm_bin" exact 0x96,0xE8 --inputs 3

step "Majority without majority cells: the proven minimum" \
    "$rm_bin" exact 0xE8 --inputs 3 --lib ribbon3-nomaj

step "What majority gates buy on this adder and a parity tree" \
    "$rm_bin" generate parity --width 16 --style tree -o "$work/parity16.blif"
"$rm_bin" compare "$work/adder16.blif" "$work/parity16.blif" \
    --lib ribbon3 --lib ribbon3-nomaj --lib ribbon2 --goal area --chart "$work/cells.svg"
printf '\nFiles are in %s; open cells.svg there in a browser.\n' "$work"
