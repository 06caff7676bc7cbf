#!/usr/bin/env bash
# Makes the GeoTIFF fixtures of terrain/geotiff_test.go with GDAL and records
# what GDAL itself reports about them in values.txt. Run once, by hand, from
# this directory; the tests do not need GDAL (CI has none).
#
#   apt-get install -y gdal-bin jq      # Debian; made with GDAL 3.6.2
#   cd testdata/geotiff && bash make.sh
#
# The source DEM is invented: a smooth synthetic surface written by awk as an
# ESRI ASCII grid, 120 x 90 cells, placed over open ocean (equatorial and
# South Atlantic, Bay of Biscay approaches) so that nobody mistakes it for a
# real place. Every fixture is that surface in another encoding.
set -euo pipefail
cd "$(dirname "$0")"
export LC_ALL=C
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

cols=120 rows=90

# surface NAME XLL YLL CELL VOIDS: write an ESRI ASCII grid (corner
# registration). Values -180..2400 m with fractions; VOIDS=1 puts a block of
# -9999 (no data) cells in it.
surface() {
  awk -v c=$cols -v r=$rows -v x=$2 -v y=$3 -v s=$4 -v voids=$5 'BEGIN {
    printf "ncols %d\nnrows %d\nxllcorner %s\nyllcorner %s\ncellsize %s\nNODATA_value -9999\n", c, r, x, y, s
    for (j = 0; j < r; j++) {
      line = ""
      for (i = 0; i < c; i++) {
        v = 900 + 700*sin(i/13.0) * cos(j/11.0) + 6.5*i - 9.25*j + 0.125*((i*7 + j*3) % 8)
        if (i > 100 && j > 70) v = -180 + 3.3*(i - 100) + 1.7*(j - 70)
        if (voids && i >= 40 && i < 52 && j >= 30 && j < 36) v = -9999
        line = line sprintf(" %.3f", v)
      }
      print substr(line, 2)
    }
  }' > "$tmp/$1.asc"
}

# Geographic: 3 arc-second cells near 0 N, 25 W (open equatorial Atlantic).
surface geo -25.05 -0.0375 0.000833333333333333 0
surface geovoid -25.05 -0.0375 0.000833333333333333 1
# UTM 26N (EPSG:32626), 30 m cells near 5 N, 27 W.
surface utm26 480000 550000 30 0
# UTM 25S (EPSG:32725), 30 m cells near 35 S, 33 W (open South Atlantic).
surface utm25s 500000 6120000 30 0
# ETRS89 UTM 28N (EPSG:25828), 25 m cells near 45 N, 15 W (open Atlantic).
surface etrs28 500000 4980000 25 1

: > values.txt
{
  echo "# What GDAL $(gdalinfo --version | sed 's/,.*//; s/^GDAL //') printed for the fixtures made by make.sh."
  echo "# fixture NAME: the file; info: gdalinfo -json (size, block size, data type, no-data, compression);"
  echo "# corner NAME X Y: gdalinfo -json cornerCoordinates; px COL ROW VALUE: gdallocationinfo -valonly;"
  echo "# geo X Y VALUE: gdallocationinfo -valonly -geoloc (X Y in the file's CRS);"
  echo "# wgs84 W S E N: box of gdalinfo -json wgs84Extent; minmax MIN MAX: gdalinfo -json -mm computedMin/Max."
} >> values.txt

# wgs84_minmax FILE JSON: the lon/lat box of gdalinfo's wgs84Extent and the
# band 1 minimum and maximum gdalinfo -mm computes (no-data excluded).
wgs84_minmax() {
  echo "wgs84 $(jq -r '.wgs84Extent.coordinates[0] | [(map(.[0]) | min), (map(.[1]) | min), (map(.[0]) | max), (map(.[1]) | max)] | @tsv' <<<"$2")"
  echo "minmax $(gdalinfo -json -mm "$1" | jq -r '.bands[0] | "\(.computedMin) \(.computedMax)"')"
}

# make NAME SRC SRS TYPE [gdal_translate options...]
fixture() {
  local name=$1 src=$2 srs=$3 type=$4
  shift 4
  gdal_translate -q -of GTiff -a_srs "$srs" -ot "$type" "$@" "$tmp/$src.asc" "$name.tif"
  rm -f "$name.tif.aux.xml"
  local j
  j=$(gdalinfo -json "$name.tif")
  {
    echo
    echo "fixture $name.tif"
    echo "info $(jq -c '{size: .size, block: .bands[0].block, type: .bands[0].type, nodata: .bands[0].noDataValue, compression: .metadata.IMAGE_STRUCTURE.COMPRESSION, interleave: .metadata.IMAGE_STRUCTURE.INTERLEAVE, bands: (.bands | length), area_or_point: .metadata[""].AREA_OR_POINT}' <<<"$j")"
    jq -r '.cornerCoordinates | to_entries[] | "corner \(.key) \(.value[0]) \(.value[1])"' <<<"$j"
    wgs84_minmax "$name.tif" "$j"
    # Cells: the four corners, tile and strip edges, and some inside.
    for p in "0 0" "119 0" "0 89" "119 89" "63 31" "64 32" "31 16" "32 17" "77 45" "101 71" "110 80" "45 33" "50 35" "7 6" "8 7" "100 60"; do
      echo "px $p $(gdallocationinfo -valonly "$name.tif" $p)"
    done
    # Points in CRS coordinates: cell centres offset by a quarter cell.
    local gt x0 y0 dx dy
    gt=$(jq -r '.geoTransform | @tsv' <<<"$j")
    read -r x0 dx _ y0 _ dy <<<"$gt"
    for p in "3 5" "60 44" "118 2" "90 88" "12 70"; do
      set -- $p
      local x y
      x=$(awk -v a=$x0 -v d=$dx -v c=$1 'BEGIN { printf "%.10f", a + (c + 0.25)*d }')
      y=$(awk -v a=$y0 -v d=$dy -v r=$2 'BEGIN { printf "%.10f", a + (r + 0.75)*d }')
      echo "geo $x $y $(gdallocationinfo -valonly -geoloc "$name.tif" $x $y)"
    done
  } >> values.txt
  # What GDAL read must be the surface (-180..2400 m) or the no-data value:
  # a fixture GDAL itself misreads proves nothing.
  awk -v f="$name" '/^fixture /{cur = $2} cur == f".tif" && ($1 == "px" || $1 == "geo") {
      v = $NF + 0; if (v != -9999 && (v < -200 || v > 2500)) { print "make.sh: GDAL read " v " from " f; bad = 1 } }
    END { exit bad }' values.txt
}

g=EPSG:4326
# Geographic, one per sample type, compression, predictor and layout.
fixture geo_int16_strip_none        geo    $g Int16   -a_nodata none -co COMPRESS=NONE
fixture geo_int16_tiled_lzw_pred2   geo    $g Int16   -a_nodata none -co TILED=YES -co BLOCKXSIZE=64 -co BLOCKYSIZE=32 -co COMPRESS=LZW -co PREDICTOR=2
fixture geo_uint16_strip_deflate_pred2 geo $g UInt16  -a_nodata none -co BLOCKYSIZE=7 -co COMPRESS=DEFLATE -co PREDICTOR=2
fixture geo_int32_tiled_packbits    geo    $g Int32   -a_nodata none -co TILED=YES -co BLOCKXSIZE=32 -co BLOCKYSIZE=32 -co COMPRESS=PACKBITS
fixture geo_int32_strip_lzw_pred2   geo    $g Int32   -a_nodata none -co BLOCKYSIZE=16 -co COMPRESS=LZW -co PREDICTOR=2
fixture geo_float32_tiled_deflate_pred3 geo $g Float32 -a_nodata none -co TILED=YES -co BLOCKXSIZE=48 -co BLOCKYSIZE=32 -co COMPRESS=DEFLATE -co PREDICTOR=3
fixture geo_float32_strip_lzw_pred3_nodata geovoid $g Float32 -co BLOCKYSIZE=5 -co COMPRESS=LZW -co PREDICTOR=3
fixture geo_float32_strip_packbits  geo    $g Float32 -a_nodata none -co COMPRESS=PACKBITS
fixture geo_float64_tiled_lzw_pred3 geo    $g Float64 -a_nodata none -co TILED=YES -co BLOCKXSIZE=32 -co BLOCKYSIZE=16 -co COMPRESS=LZW -co PREDICTOR=3
fixture geo_float64_strip_deflate   geo    $g Float64 -a_nodata none -co COMPRESS=DEFLATE
# Horizontal differencing of float bit patterns (PREDICTOR=2 on floats).
fixture geo_float32_strip_deflate_pred2 geovoid $g Float32 -co BLOCKYSIZE=9 -co COMPRESS=DEFLATE -co PREDICTOR=2
fixture geo_float64_tiled_lzw_pred2 geo    $g Float64 -a_nodata none -co TILED=YES -co BLOCKXSIZE=48 -co BLOCKYSIZE=48 -co COMPRESS=LZW -co PREDICTOR=2
# Big-endian files (ENDIANNESS=BIG). No big-endian file with the
# floating-point predictor: GDAL 3.6.2 writes ENDIANNESS=BIG PREDICTOR=3 with
# the byte lanes least significant first (Technical Note 3 puts the most
# significant first, as GDAL's little-endian files do) and reads its own file
# back as garbage (gdallocationinfo printed 3.489e-41 for the cell that holds
# 900 m). terrain/geotiff_test.go builds that case by hand instead.
fixture geo_int16_be_strip_deflate_pred2 geo $g Int16 -a_nodata none -co ENDIANNESS=BIG -co COMPRESS=DEFLATE -co PREDICTOR=2
fixture geo_float32_be_tiled_lzw geovoid $g Float32 -co ENDIANNESS=BIG -co TILED=YES -co BLOCKXSIZE=32 -co BLOCKYSIZE=32 -co COMPRESS=LZW
# BigTIFF.
fixture geo_float32_bigtiff_tiled_deflate geo $g Float32 -a_nodata none -co BIGTIFF=YES -co TILED=YES -co COMPRESS=DEFLATE
# Two bands stored as separate planes (band 1 is read) and interleaved (refused).
gdal_translate -q -a_srs $g -ot Int16 -a_nodata none "$tmp/geo.asc" "$tmp/b1.tif"
gdalbuildvrt -q -separate "$tmp/twobands.vrt" "$tmp/b1.tif" "$tmp/b1.tif"

make_vrt() {
  local name=$1
  shift
  gdal_translate -q -of GTiff "$@" "$tmp/twobands.vrt" "$name.tif"
}
make_vrt geo_int16_2band_planar -co INTERLEAVE=BAND -co COMPRESS=DEFLATE
make_vrt geo_int16_2band_pixel  -co INTERLEAVE=PIXEL -co COMPRESS=DEFLATE
for n in geo_int16_2band_planar geo_int16_2band_pixel; do
  j=$(gdalinfo -json "$n.tif")
  {
    echo
    echo "fixture $n.tif"
    echo "info $(jq -c '{size: .size, block: .bands[0].block, type: .bands[0].type, nodata: .bands[0].noDataValue, compression: .metadata.IMAGE_STRUCTURE.COMPRESSION, interleave: .metadata.IMAGE_STRUCTURE.INTERLEAVE, bands: (.bands | length), area_or_point: .metadata[""].AREA_OR_POINT}' <<<"$j")"
    jq -r '.cornerCoordinates | to_entries[] | "corner \(.key) \(.value[0]) \(.value[1])"' <<<"$j"
    wgs84_minmax "$n.tif" "$j"
    for p in "0 0" "119 0" "0 89" "119 89" "63 31" "64 32" "31 16" "77 45" "101 71" "110 80"; do
      echo "px $p $(gdallocationinfo -valonly -b 1 "$n.tif" $p)"
    done
  } >> values.txt
done

# UTM, north and south zones, ETRS89, and a PixelIsPoint file.
fixture utm32626_int16_tiled_deflate        utm26  EPSG:32626 Int16   -a_nodata none -co TILED=YES -co BLOCKXSIZE=64 -co BLOCKYSIZE=64 -co COMPRESS=DEFLATE
fixture utm32725_float32_strip_deflate_pred3 utm25s EPSG:32725 Float32 -a_nodata none -co BLOCKYSIZE=10 -co COMPRESS=DEFLATE -co PREDICTOR=3
fixture utm25828_int16_strip_packbits_nodata etrs28 EPSG:25828 Int16 -co COMPRESS=PACKBITS
fixture utm32626_float32_point_lzw          utm26  EPSG:32626 Float32 -a_nodata none -mo AREA_OR_POINT=Point -co COMPRESS=LZW

# A rotated raster (ModelTransformation with rotation terms): must be refused.
gdal_translate -q -a_srs $g -ot Int16 -a_nodata none -outsize 16 12 "$tmp/geo.asc" "$tmp/small.tif"
gdal_translate -q -of VRT "$tmp/small.tif" "$tmp/rot.vrt"
sed -i 's|<GeoTransform>.*</GeoTransform>|<GeoTransform>-25.05, 0.001, 0.0002, 0.0375, 0.0002, -0.001</GeoTransform>|' "$tmp/rot.vrt"
gdal_translate -q "$tmp/rot.vrt" geo_int16_rotated.tif
rm -f ./*.aux.xml
{
  echo
  echo "fixture geo_int16_rotated.tif"
  echo "transform $(gdalinfo -json geo_int16_rotated.tif | jq -c .geoTransform)"
} >> values.txt
ls -l ./*.tif
