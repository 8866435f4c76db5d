#!/usr/bin/env bash
# Regenerates app/components/staffGlyphs.ts (see server/staff-glyphs.py).
exec "$(dirname "$0")/fonttools.sh" server/staff-glyphs.py
