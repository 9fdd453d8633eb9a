# CLI golden cases: name, expected exit status, stderr regex, arguments.
# Exit status: 0 done, 1 an input could not be used, 2 usage error, 3 done
# and written but a test of the data failed.
set(B --base @DATA@/base.csv --base-height 812.4 --base-at 46.8,9.9)
set(R @DATA@/rover.gpx)
set(O -o @OUT@/out.gpx)

function(hyp_cli_case name rc regex)
  add_test(NAME cli_${name}
    COMMAND ${CMAKE_COMMAND} -DEXE=$<TARGET_FILE:hypsolev-cli> -DDATA=${PROJECT_SOURCE_DIR}/tests/data
            -DWORK=${CMAKE_CURRENT_BINARY_DIR}/cli/${name} -DEXPECT_RC=${rc} "-DEXPECT_ERR=${regex}"
            "-DARGS=${ARGN}" "-DINPUTS=${HYP_CASE_INPUTS}" "-DGOLDEN=${HYP_CASE_GOLDEN}" "-DGOLDEN_OUT=${HYP_CASE_GOLDEN_OUT}"
            "-DPROJ_DB_ONLY=${HYP_CASE_PROJ_DB_ONLY}" "-DEXPECT_OUT=${HYP_CASE_OUT}"
            -P ${PROJECT_SOURCE_DIR}/tests/cli/run_case.cmake)
  set_tests_properties(cli_${name} PROPERTIES LABELS cli TIMEOUT 150)
endfunction()

set(HYP_CASE_INPUTS @DATA@/rover.gpx @DATA@/base.csv)
hyp_cli_case(ok_gpx 0 "61 of 61 corrected.*wrote" correct ${R} ${B} ${O} --table @OUT@/t.csv)
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
hyp_cli_case(golden_table 0 "wrote" correct ${R} ${B} --table @OUT@/t.csv)
# the same track as a CSV log in local time (semicolons, decimal commas, BOM,
# CRLF, quotes, comments) gives the same table
hyp_cli_case(golden_csv_rover_local_time 0 "wrote" correct @DATA@/rover_local.csv --time-zone Europe/Vienna ${B} --table @OUT@/t.csv -o @OUT@/t.gpx)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
set(HYP_CASE_INPUTS "")

# malformed or unusable input: exit 1, a message naming file, place, problem
hyp_cli_case(truncated_xml 1 "truncated.gpx:5: the file ends with [0-9]+ element\\(s\\) still open: cut off while being written" correct @DATA@/bad/truncated.gpx ${B} ${O})
hyp_cli_case(wrong_root 1 "wrong_root.gpx:2: root element is <kml>, expected <gpx>" correct @DATA@/bad/wrong_root.gpx ${B} ${O})
hyp_cli_case(missing_time 1 "no_time.gpx: no point has a <time>" correct @DATA@/bad/no_time.gpx ${B} ${O})
hyp_cli_case(bad_ele 1 "bad_ele.gpx:4: <ele> \"81x2\" is not a number" correct @DATA@/bad/bad_ele.gpx ${B} ${O})
hyp_cli_case(bad_lat 1 "bad_lat.gpx:4: <trkpt> lat \"north\" is not a number" correct @DATA@/bad/bad_lat.gpx ${B} ${O})
hyp_cli_case(gpx_unknown_unit 1 "unknown_unit.gpx:4: unit=\"bar\" on <pressure> is unknown; expected one of Pa, hPa" correct @DATA@/bad/unknown_unit.gpx ${B} ${O})
hyp_cli_case(gpx_no_pressure 1 "no_pressure.gpx: no point has a pressure .*--pressure-field" correct @DATA@/bad/no_pressure.gpx ${B} ${O})
hyp_cli_case(latin1 1 "latin1.gpx:1: encoding \"ISO-8859-1\" is not supported" correct @DATA@/bad/latin1.gpx ${B} ${O})
hyp_cli_case(doctype_entities 1 "entities.gpx:[0-9]+: document type declaration \\(DOCTYPE\\) refused" correct @DATA@/bad/entities.gpx ${B} ${O})
hyp_cli_case(impossible_date 1 "impossible_date.gpx:4: <time> \"2026-02-30T07:00:00Z\" is out of range" correct @DATA@/bad/impossible_date.gpx ${B} ${O})
hyp_cli_case(empty_base 1 "empty.csv: empty file" correct ${R} --base @DATA@/bad/empty.csv --base-height 800 ${O})
hyp_cli_case(csv_no_header 1 "no_header.csv:1: header: no \"time\" column .*looks like data" correct ${R} --base @DATA@/bad/no_header.csv --base-height 800 ${O})
hyp_cli_case(csv_no_pressure 1 "no_pressure_col.csv:1: header: no \"pressure\" column in the header \\(found \"time\", \"temperature\"\\)" correct ${R} --base @DATA@/bad/no_pressure_col.csv --base-height 800 ${O})
hyp_cli_case(csv_no_zone 1 "no_zone.csv:2: time \"2026-06-18T07:00:00\" has no time zone" correct ${R} --base @DATA@/bad/no_zone.csv --base-height 800 ${O})
hyp_cli_case(csv_bad_number 1 "bad_number.csv:3: pressure \"1O13.2\" is not a number" correct ${R} --base @DATA@/bad/bad_number.csv --base-height 800 ${O})
hyp_cli_case(csv_ambiguous_unit 1 "ambiguous_unit.csv: pressure: no unit given and values 700.1 to 700.2 fit hPa or mmHg; give the unit with --pressure-unit" correct ${R} --base @DATA@/bad/ambiguous_unit.csv --base-height 800 ${O})
hyp_cli_case(csv_unknown_unit 1 "unknown_unit.csv:1: column \"pressure\": unknown unit \"bar\"" correct ${R} --base @DATA@/bad/unknown_unit.csv --base-height 800 ${O})
hyp_cli_case(csv_nul 1 "nul.csv:1: NUL byte; not a text file" correct ${R} --base @DATA@/bad/nul.csv --base-height 800 ${O})
hyp_cli_case(csv_rover_no_lon 1 "rover_no_lon.csv:1: header: a rover log needs \"lat\" and \"lon\" columns" correct @DATA@/bad/rover_no_lon.csv ${B} ${O})
hyp_cli_case(base_one_row 1 "one_row.csv: fewer than two usable base samples" correct ${R} --base @DATA@/bad/one_row.csv --base-height 800 ${O})
hyp_cli_case(no_time_overlap 1 "no rover sample could be corrected \\(61 outside the base log's time span" correct ${R} --base @DATA@/bad/early_base.csv --base-height 800 ${O})
hyp_cli_case(directory_input 1 "bad: is a directory, expected a log file" correct ${R} --base @DATA@/bad --base-height 800 ${O})
hyp_cli_case(missing_file 1 "nothere.gpx: cannot open: No such file" correct @DATA@/nothere.gpx ${B} ${O})
hyp_cli_case(missing_out_dir 1 "out.gpx: cannot write: the directory does not exist" correct ${R} ${B} -o @OUT@/no/such/dir/out.gpx)
# copes and warns: exit 0
hyp_cli_case(unsorted_base 0 "unsorted_base.csv:32: pressure 12.50 hPa is outside 300-1100 hPa.*unsorted_base.csv: 1 time goes back in the file \\(the first at line 23: 2026-06-18T07:10:00Z, 60 s before.*put in time order" correct ${R} --base @DATA@/bad/unsorted_base.csv --base-height 812.4 --base-at 46.8,9.9 ${O})

# usage errors: exit 2
hyp_cli_case(no_base_height 2 "--base .*base.csv has no --base-height" correct ${R} --base @DATA@/base.csv ${O})
hyp_cli_case(bad_base_at 2 "--base-at latitude \"95\": expected a number from -90 to 90" correct ${R} --base @DATA@/base.csv --base-height 1 --base-at 95,9 ${O})
hyp_cli_case(per_base_before_base 2 "--base-height must follow the --base it applies to" correct ${R} --base-height 1 ${O})
hyp_cli_case(unknown_option 2 "option \"--frobnicate\" is unknown" correct ${R} ${B} ${O} --frobnicate)
hyp_cli_case(no_output 2 "no output: give -o" correct ${R} ${B})
hyp_cli_case(bad_zone 2 "--time-zone: time zone \"Mars/Olympus\": no such zone" correct ${R} ${B} ${O} --time-zone Mars/Olympus)
hyp_cli_case(bad_unit_option 2 "--pressure-unit \"psi\": expected one of Pa, hPa" correct ${R} ${B} ${O} --pressure-unit psi)
hyp_cli_case(two_bases 0 "chosen: two bases that do not bracket the track \\(88 m apart\\): single base.*never compared" correct ${R} ${B} --base @DATA@/base.csv --base-height 900 ${O})
set(HYP_CASE_INPUTS @DATA@/rover.gpx)
hyp_cli_case(output_is_input 2 "rover.gpx: -o would overwrite an input" correct ${R} ${B} -o @DATA@/rover.gpx)
set(HYP_CASE_INPUTS "")
hyp_cli_case(help 0 "" correct --help)
hyp_cli_case(no_command 2 "usage: hypsolev COMMAND")

# benchmarks and ties
hyp_cli_case(ties_ok 0 "ties      3 calibration.*BM-2 .*\\(given\\): known 1004.400 m" correct ${R} ${B} --benchmarks @DATA@/benchmarks.csv --ties @DATA@/ties.csv --table @OUT@/t.csv)
hyp_cli_case(bench_no_height 1 "bench_no_height.csv:1: header: no \"height\" column" correct ${R} ${B} ${O} --benchmarks @DATA@/bad/bench_no_height.csv)
hyp_cli_case(bench_bad_lat 1 "bench_bad_lat.csv:2: lat 95 is outside -90 to 90" correct ${R} ${B} ${O} --benchmarks @DATA@/bad/bench_bad_lat.csv)
hyp_cli_case(bench_duplicate 1 "bench_duplicate.csv:3: benchmark \"bm-1\" is listed twice" correct ${R} ${B} ${O} --benchmarks @DATA@/bad/bench_duplicate.csv)
hyp_cli_case(ties_unknown 1 "ties_unknown.csv:2: name \"BM-X\" is not a benchmark of --benchmarks" correct ${R} ${B} ${O} --benchmarks @DATA@/benchmarks.csv --ties @DATA@/bad/ties_unknown.csv)
hyp_cli_case(ties_reversed 1 "ties_reversed.csv:2: end 2026-06-18T07:00:00Z is not after start" correct ${R} ${B} ${O} --ties @DATA@/bad/ties_reversed.csv)
hyp_cli_case(bad_smooth 2 "--smooth \"-5\": expected a number from 0 to 3600" correct ${R} ${B} ${O} --smooth -5)

# heights and positions
hyp_cli_case(height_crs_ellipsoidal 0 "heights   in WGS84 ellipsoid \\(EPSG:4979\\).*crs       easting/northing in WGS 84 / UTM zone 32N" correct ${R} ${B} --table @OUT@/t.csv --height-crs ellipsoidal --crs utm)
hyp_cli_case(bad_vref 2 "--gnss-heights \"msl\": expected geoid or ellipsoidal" correct ${R} ${B} ${O} --gnss-heights msl)
hyp_cli_case(bad_crs 2 "--crs \"EPSG:4326\": not a projected CRS" correct ${R} ${B} ${O} --crs EPSG:4326)
find_file(HYP_PROJ_DB proj.db PATHS /usr/share/proj /usr/local/share/proj NO_DEFAULT_PATH)
if(HYP_PROJ_DB)
  set(HYP_CASE_PROJ_DB_ONLY ${HYP_PROJ_DB})
  hyp_cli_case(geoid_grid_missing 1 "grid us_nga_egm96_15.tif not found .*vertical conversions refused" correct ${R} ${B} ${O} --height-crs ellipsoidal)
  # without a vertical conversion the same run needs no grid
  hyp_cli_case(no_grid_needed 0 "wrote" correct ${R} ${B} ${O})
  set(HYP_CASE_PROJ_DB_ONLY "")
endif()

# hostile and broken input (issue: hardening); each must end by exit status,
# within the 30 s timeout, naming the file, the place and the problem
set(BB --base-height 812.4 ${O})
hyp_cli_case(hostile_external_entity 1 "external_entity.gpx:2: document type declaration \\(DOCTYPE\\) refused" correct @DATA@/bad/external_entity.gpx ${B} ${O})
hyp_cli_case(hostile_invalid_utf8 1 "invalid_utf8.gpx:4: not well-formed XML: Input is not proper UTF-8" correct @DATA@/bad/invalid_utf8.gpx ${B} ${O})
hyp_cli_case(hostile_deep_nesting 1 "deep.gpx:4: elements nested deeper than 256 levels" correct @DATA@/bad/deep.gpx ${B} ${O})
hyp_cli_case(hostile_lat_out_of_range 0 "lat_out_of_range.gpx:7: position 95, 9.9 is not a latitude in -90..90" correct @DATA@/bad/lat_out_of_range.gpx ${B} ${O})
hyp_cli_case(hostile_huge_line 1 "huge_line.csv:2: line longer than 1048576 bytes" correct ${R} --base @DATA@/bad/huge_line.csv ${BB})
hyp_cli_case(hostile_many_columns 1 "many_columns.csv:1: header has more than 4096 columns" correct ${R} --base @DATA@/bad/many_columns.csv ${BB})
hyp_cli_case(hostile_far_future 1 "far_future.csv:2: time \"2301-06-18T07:00:00Z\" is out of range" correct ${R} --base @DATA@/bad/far_future.csv ${BB})
hyp_cli_case(hostile_nan 1 "nan_inf.csv:2: pressure \"nan\" is not a finite number.*nan_inf.csv: 1 of 1 samples with a time and a pressure refused" correct ${R} --base @DATA@/bad/nan_inf.csv ${BB})
hyp_cli_case(hostile_1e308 1 "huge_value.csv:2: pressure \"1e308\" is out of range; expected a pressure \\(at most 1e6 in any unit\\); sample dropped" correct ${R} --base @DATA@/bad/huge_value.csv ${BB})
hyp_cli_case(hostile_1e999 1 "overflow_value.csv:2: pressure \"1e999\" is not a finite number.*overflow_value.csv: 1 of 1 samples" correct ${R} --base @DATA@/bad/overflow_value.csv ${BB})
hyp_cli_case(hostile_reversed_times 0 "reversed.csv: 59 times go back in the file \\(the first at line 3: .*put in time order" correct ${R} --base @DATA@/bad/reversed.csv ${BB})
hyp_cli_case(hostile_duplicate_times 0 "duplicate_times.csv:3: time 2026-06-18T06:50:00Z is the same as line 2's; sample dropped as a duplicate" correct ${R} --base @DATA@/bad/duplicate_times.csv ${BB})
hyp_cli_case(hostile_not_a_directory 1 "base.csv/x: cannot open: Not a directory" correct ${R} --base @DATA@/base.csv/x ${BB})
hyp_cli_case(hostile_table_is_input 2 "rover.gpx: --table would overwrite an input" correct ${R} ${B} --table @DATA@/rover.gpx)
hyp_cli_case(hostile_output_is_directory 1 "is a directory, expected an output file name" correct ${R} ${B} -o @DATA@)
hyp_cli_case(hostile_empty_gpx_text 1 "empty file" correct @DATA@/bad/empty.csv ${B} ${O})

# several bases
hyp_cli_case(bad_method 2 "--method \"three\": expected auto, single, two-base or field" correct ${R} ${B} ${O} --method three)
hyp_cli_case(two_base_forced_one 2 "the two-base method needs exactly two bases" correct ${R} ${B} ${O} --method two-base)
hyp_cli_case(field_needs_positions 2 "the field method needs every base's position" correct ${R} ${B} --base @DATA@/base.csv --base-height 900 --base @DATA@/base.csv --base-height 950 ${O})
hyp_cli_case(base_offset_option 0 "instrument offset \\+0.500 hPa" correct ${R} ${B} --base @DATA@/base.csv --base-height 900 --base-offset 50 ${O} --method single)

# inspect
set(HYP_CASE_OUT "interval 60.0 s.*problems    none found")
hyp_cli_case(inspect_clean 0 "" inspect @DATA@/base.csv)
set(HYP_CASE_OUT "clock jump   2026-06-18T07:10:00Z: time went back 60 s, line 23")
hyp_cli_case(inspect_clock_jump 0 "" inspect @DATA@/bad/unsorted_base.csv)
set(HYP_CASE_OUT "")
hyp_cli_case(inspect_bad_file 1 "empty.csv: empty file" inspect @DATA@/bad/empty.csv)
hyp_cli_case(inspect_no_file 2 "no file given" inspect)
hyp_cli_case(correct_warns_base_quality 0 "unsorted_base.csv:23: clock jump   2026-06-18T07:10:00Z: time went back 60 s" correct ${R} --base @DATA@/bad/unsorted_base.csv --base-height 812.4 --base-at 46.8,9.9 ${O})
hyp_cli_case(report_quiet 0 "^$" correct ${R} ${B} ${O} --report @OUT@/r.txt -q)
set(HYP_CASE_OUT "3 samples \\(3 usable\\), interval 60.0 s")
hyp_cli_case(csv_cr_line_ends 0 "" inspect @DATA@/cr_only.csv)
set(HYP_CASE_OUT "")
set(HYP_CASE_INPUTS @DATA@/rover.gpx)
hyp_cli_case(summary_is_input 2 "--summary would overwrite an input" correct ${R} ${B} --table @OUT@/t.csv --summary @DATA@/rover.gpx)
set(HYP_CASE_INPUTS "")

# outputs that would destroy an input or each other: refused before
# anything is written (exit 2), every input unchanged
set(HYP_CASE_INPUTS @DATA@/rover.gpx @DATA@/base.csv @DATA@/benchmarks.csv @DATA@/ties.csv)
hyp_cli_case(table_is_benchmarks 2 "benchmarks.csv: --table would overwrite an input" correct ${R} ${B} ${O} --benchmarks @DATA@/benchmarks.csv --table @DATA@/benchmarks.csv)
hyp_cli_case(report_is_ties 2 "ties.csv: --report would overwrite an input" correct ${R} ${B} ${O} --benchmarks @DATA@/benchmarks.csv --ties @DATA@/ties.csv --report @DATA@/ties.csv)
hyp_cli_case(summary_is_benchmarks 2 "benchmarks.csv: --summary would overwrite an input" correct ${R} ${B} ${O} --benchmarks @DATA@/benchmarks.csv --summary @DATA@/benchmarks.csv)
hyp_cli_case(report_is_base 2 "base.csv: --report would overwrite an input" correct ${R} ${B} ${O} --report @DATA@/base.csv)
set(HYP_CASE_INPUTS "")
hyp_cli_case(gpx_is_table 2 "out.gpx: named by both -o and --table" correct ${R} ${B} ${O} --table @OUT@/out.gpx)
hyp_cli_case(report_is_gpx 2 "out.gpx: named by both -o and --report" correct ${R} ${B} ${O} --report @OUT@/out.gpx)
hyp_cli_case(summary_is_table 2 "t.csv: named by both --table and --summary" correct ${R} ${B} --table @OUT@/t.csv --summary @OUT@/t.csv)
hyp_cli_case(both_to_stdout 2 "-o - and --table - both go to standard output" correct ${R} ${B} -o - --table -)
hyp_cli_case(empty_output_name 2 "-o \"\": an output needs a file name" correct ${R} ${B} --output=)
hyp_cli_case(same_rover_twice 2 "rover.gpx and .*rover.gpx would both write .*rover.gpx" correct ${R} ${R} ${B} --out-dir @OUT@)
hyp_cli_case(same_stem_gpx_csv 2 "rover.gpx and .*rover.csv would both write" correct ${R} @DATA@/bad/samestem/rover.csv ${B} --out-dir @OUT@ --time-zone Europe/Vienna)
# a report that cannot be written fails the run, and nothing else is written
hyp_cli_case(report_unwritable 1 "r.txt: cannot write: the directory does not exist" correct ${R} ${B} ${O} --report @OUT@/no/such/dir/r.txt)
# the option parser's own messages
hyp_cli_case(missing_value 2 "option \"--table\" needs a value" correct ${R} ${B} ${O} --table)
hyp_cli_case(hex_number 2 "--base-height \"0x10\": expected a number from -500 to 9000" correct ${R} --base @DATA@/base.csv --base-height 0x10 ${O})

# adjust: bad input gets a clear message (exit 1), usage errors exit 2
set(A adjust @DATA@/rover.gpx ${B} --stations @DATA@/benchmarks.csv -o @OUT@/st.csv)
# this fixture's BM-2 window is walking, not standing: the network cannot
# agree with the published height, and says so with exit status 3
hyp_cli_case(adjust_flags_disagreement 3 "hypsolev adjust: 2 stations in the file.*global .*FAILED.*exit status 3" ${A} --occupations @DATA@/adjust/book.csv --no-find-occupations)
hyp_cli_case(adjust_book_unknown_station 1 "book_unknown.csv:3: station \"BM-9\" is not in the stations file" ${A} --occupations @DATA@/adjust/book_unknown.csv)
hyp_cli_case(adjust_book_overlap 1 "book_overlap.csv:3: the window on BM-2 overlaps line 2's on BM-1 for the same rover rover" ${A} --occupations @DATA@/adjust/book_overlap.csv)
hyp_cli_case(adjust_book_outside_and_unknown_rover 0 "book_outside.csv:3: the window on BM-2 lies outside the track rover.*book_outside.csv:4: rover \"walk\" is none of the tracks given" ${A} --occupations @DATA@/adjust/book_outside.csv)
hyp_cli_case(adjust_station_duplicate 1 "bench_duplicate.csv:3: station \"bm-1\" is listed twice" adjust @DATA@/rover.gpx ${B} --stations @DATA@/bad/bench_duplicate.csv -o @OUT@/st.csv)
hyp_cli_case(adjust_station_off_globe 1 "bench_bad_lat.csv:2: lat 95 is outside -90 to 90" adjust @DATA@/rover.gpx ${B} --stations @DATA@/bad/bench_bad_lat.csv -o @OUT@/st.csv)
hyp_cli_case(adjust_no_control 1 "no occupied control station and no co-location with a base: nothing fixes the heights" adjust @DATA@/rover.gpx --base @DATA@/base.csv --base-height 812.4 --stations @DATA@/adjust/stations_nocontrol.csv --occupations @DATA@/adjust/book.csv -o @OUT@/st.csv)
hyp_cli_case(adjust_no_stations 2 "no --stations FILE given" adjust @DATA@/rover.gpx ${B} -o @OUT@/st.csv)
hyp_cli_case(adjust_no_output 2 "no output: give -o STATIONS.csv" adjust @DATA@/rover.gpx ${B} --stations @DATA@/benchmarks.csv)
set(HYP_CASE_INPUTS @DATA@/benchmarks.csv)
hyp_cli_case(adjust_output_is_input 2 "benchmarks.csv: -o would overwrite an input" adjust @DATA@/rover.gpx ${B} --stations @DATA@/benchmarks.csv -o @DATA@/benchmarks.csv)
set(HYP_CASE_INPUTS "")
# a base log kept in local summer time and marked as UTC (2 h ahead): the
# co-location lines up only with the shifted log; refused, the offset named
hyp_cli_case(base_local_time_as_utc 1 "the base's clock looks 2 h 00 min ahead of the rover's.*--base-clock-offset \\+7200" correct ${R} --base @DATA@/bad/base_local_as_utc.csv --base-height 812.4 --base-at 46.8,9.9 ${O})
hyp_cli_case(base_local_time_offset_given 0 "wrote" correct ${R} --base @DATA@/bad/base_local_as_utc.csv --base-height 812.4 --base-at 46.8,9.9 --base-clock-offset 7200 ${O})
# a track tied to nothing (no co-location, no control, no shared station):
# its stations and its offset are named
set(SK ${PROJECT_SOURCE_DIR}/surveys/skelvorn-moor)
hyp_cli_case(adjust_untied_block 1 "nothing ties these to a control station or a base: .*GR05, GR06, rb-day1 offset" adjust ${SK}/ra-day1.gpx ${SK}/rb-day1.gpx --stations ${SK}/stations.csv --base-dir ${SK} --occupations @DATA@/adjust/book_singular.csv --no-find-occupations --no-auto-colocate -o @OUT@/st.csv)

# Readers that never let a bad sample poison a run (defects found by users).
# run_case.cmake also checks every case for nan/inf on stdout, stderr and in
# every output file. The summary is on stderr.
set(BN --base @DATA@/base.csv --base-height 812.4)
# an <ele> of 1e39 overflows float: the point's own height is refused, its
# pressure kept; without a co-location the track is levelled on the
# (remaining) GNSS heights
hyp_cli_case(reader_ele_1e39 0 "ele_1e39.gpx:54: ele \"1e39\" is out of range; expected a height of -1000..10000 m; the point's own height is ignored \\(its pressure is still used\\).*heights +120 of 120 corrected" correct @DATA@/bad/ele_1e39.gpx ${BN} ${O} --table @OUT@/t.csv)
hyp_cli_case(reader_ele_1e39_colocated 0 "ele_1e39.gpx:54: ele \"1e39\" is out of range.*heights +120 of 120 corrected" correct @DATA@/bad/ele_1e39.gpx ${B} ${O} --table @OUT@/t.csv)
# one time three hours ahead: only that point is lost
hyp_cli_case(reader_time_outlier 0 "time_outlier.gpx:44: time 2026-06-18T10:10:00Z is far out of line with the samples around it \\(2026-06-18T07:09:30Z and 2026-06-18T07:10:30Z\\); sample dropped.*heights +119 of 120 corrected" correct @DATA@/bad/time_outlier.gpx ${B} ${O})
# a track written in reverse: sorted, every point kept, the output in file order
hyp_cli_case(reader_reversed_track 0 "reversed_track.gpx: 119 times go back in the file \\(the first at line 5: .*put in time order.*heights +120 of 120 corrected" correct @DATA@/bad/reversed_track.gpx ${B} ${O} --table @OUT@/t.csv)
# a base kept in local time across the autumn clock change (Europe/Vienna,
# 2026-10-25 03:00 CEST -> 02:00 CET, Directive 2000/84/EC): no hour lost
hyp_cli_case(reader_dst_fallback 0 "dst_fallback_base.csv:93: the local times \\(read in Europe/Vienna\\) cross a clock change here, UTC\\+02:00 to UTC\\+01:00.*dst_fallback_base.csv:93: the clock was set back.*60 stamps from here on.*no hour is lost.*181 samples \\(181 usable\\).*heights +120 of 120 corrected" correct @DATA@/bad/dst_rover.gpx --base @DATA@/bad/dst_fallback_base.csv --base-time-zone Europe/Vienna --base-height 812.4 ${O})
# 70 % refused: the run stops and says how many and why
hyp_cli_case(reader_most_refused 1 "refused_70.gpx: 84 of 120 samples with a time and a pressure refused \\(70 %\\): 60 pressure outside 300-1100 hPa, 24 pressure not a finite number in any unit's range; more than half" correct @DATA@/bad/refused_70.gpx ${B} ${O})
# a second <gpx> nested in <metadata><time> (a fuzzer's find): its points are not the track's
hyp_cli_case(reader_nested_gpx 0 "rover +20 samples \\(20 usable\\).*heights +20 of 20 corrected" correct @DATA@/bad/nested_gpx.gpx ${B} ${O})
# whitespace around numbers and times (xsd:decimal, xsd:dateTime collapse it)
hyp_cli_case(reader_whitespace 0 "rover +3 samples \\(3 usable\\).*heights +3 of 3 corrected" correct @DATA@/bad/whitespace.gpx ${B} ${O})
# a control character found in a value is shown escaped, never raw
hyp_cli_case(reader_newline_in_time 1 "newline_in_time.gpx:5: <time> \"2026-06-18\\\\n07:00:00Z\" is not an ISO 8601 time" correct @DATA@/bad/newline_in_time.gpx ${B} ${O})
# a base in Pa labelled hPa: one message that says which unit the values fit
hyp_cli_case(reader_pa_labelled_hpa 1 "^hypsolev: error: [^\n]*pa_labelled_hpa.csv: 61 of 61 samples with a time and a pressure refused \\(100 %\\): 61 pressure outside 300-1100 hPa; no sample is usable; the values 92258 to 92270 read as hPa are out of range but fit Pa: is the unit label wrong\\?" correct ${R} --base @DATA@/bad/pa_labelled_hpa.csv --base-height 812.4 ${O})

# The calibration test (issue 15). Exit status 3: the run completed and
# wrote its outputs, but a test of its data failed.
# A tie booked at the wrong time (BM-2 at 07:14, while the rover was still
# climbing): rejected, and the table is byte for byte that of the same run
# without the wrong line (ties_table.csv, written by the program before the
# test existed: no rejection changes nothing on clean ties).
set(HYP_CASE_INPUTS @DATA@/rover.gpx @DATA@/base.csv @DATA@/benchmarks.csv @DATA@/ties.csv @DATA@/ties_wrong_time.csv)
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/ties_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
hyp_cli_case(golden_ties_table 0 "every calibration agrees with the others" correct ${R} ${B} --benchmarks @DATA@/benchmarks.csv --ties @DATA@/ties.csv --table @OUT@/t.csv)
hyp_cli_case(tie_wrong_time_rejected 3 "warning: calibration BM-2 at 2026-06-18T07:14:00Z: misclosure -127.445 m disagrees with the other calibrations \\(w -49.9, critical 3.29\\): rejected.*rejected: w -49.9 beyond 3.29.*test      FAILED: 1 calibration\\(s\\) rejected" correct ${R} ${B} --benchmarks @DATA@/benchmarks.csv --ties @DATA@/ties_wrong_time.csv --table @OUT@/t.csv)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
# Two calibrations that disagree, no third (BM-1 found at the start, BM-2
# booked at 07:14): the test cannot tell which; both kept, the sigma
# widened; exit 3, outputs written.
hyp_cli_case(ties_disagree_cannot_tell 3 "calibration BM-1 at 2026-06-18T07:00:00Z: misclosure -3.366 m: w \\+42.8 beyond 3.29, but too few calibrations to tell.*test      FAILED: calibrations disagree .*too few remain to tell which is wrong: all kept, the offset's sigma widened by 9.57 hPa" correct ${R} --base @DATA@/base.csv --base-height 812.4 --benchmarks @DATA@/benchmarks.csv --ties @DATA@/tie_wrong_only.csv --table @OUT@/t.csv)
# The batch summary's exit_status column follows.
set(HYP_CASE_OUT "rover.gpx\",61,61,single base,4,1.007,3,\"written; calibration test failed: calibration rejected\"")
hyp_cli_case(tie_wrong_time_summary 3 "rejected" correct ${R} ${B} --benchmarks @DATA@/benchmarks.csv --ties @DATA@/ties_wrong_time.csv --out-dir @OUT@ --summary -)
set(HYP_CASE_OUT "")
set(HYP_CASE_INPUTS "")
# each base is read its own way: a base whose pressure column is "baro"
# beside a rover whose element is "pressure"
hyp_cli_case(base_own_pressure_field 0 "heights +61 of 61 corrected" correct ${R} --base @DATA@/base_baro_column.csv --base-height 812.4 --base-at 46.8,9.9 --base-pressure-field baro ${O})
hyp_cli_case(base_own_pressure_field_missing 1 "base_baro_column.csv:2: header: no \"pressure\" column" correct ${R} --base @DATA@/base_baro_column.csv --base-height 812.4 ${O})
hyp_cli_case(base_own_unit_bad 2 "--base-pressure-unit \"psi\": expected one of Pa, hPa" correct ${R} --base @DATA@/base.csv --base-height 812.4 --base-pressure-unit psi ${O})
# the HTML report: written by its extension; --report-html is for --out-dir
hyp_cli_case(report_html_quiet 0 "^$" correct ${R} ${B} ${O} --report @OUT@/r.html -q)
hyp_cli_case(report_html_needs_dir 2 "--report-html names the reports of --out-dir" correct ${R} ${B} ${O} --report-html)
hyp_cli_case(report_html_unwritable 1 "r.HTML: cannot write: the directory does not exist" correct ${R} ${B} ${O} --report @OUT@/no/dir/r.HTML)
# adjust without a base (issue 13): one rover alone is a loop; with no
# known mark it is refused, saying what is missing; with one mark and no
# repeat it is solved with a warning; the new options' ranges.
hyp_cli_case(adjust_loop_no_known_mark 1 "a loop without a base needs a known mark: none of the stations the rovers occupied has a height" adjust @DATA@/rover.gpx --stations @DATA@/adjust/stations_nocontrol.csv --occupations @DATA@/adjust/book.csv -o @OUT@/st.csv)
hyp_cli_case(adjust_loop_one_mark_warned 0 "loop rover: no station occupied twice and 1 known mark: the weather cannot be told apart from the heights.*BM-1 .* control" adjust @DATA@/rover.gpx --stations @DATA@/benchmarks.csv -o @OUT@/st.csv)
hyp_cli_case(adjust_min_common_bad 2 "--min-common \"5\": expected a number from 10 to 86400" adjust @DATA@/rover.gpx --stations @DATA@/benchmarks.csv -o @OUT@/st.csv --min-common 5)
hyp_cli_case(adjust_weather_walk_bad 2 "--weather-walk \"nan\": expected a number from 0.01 to 20" adjust @DATA@/rover.gpx --stations @DATA@/benchmarks.csv -o @OUT@/st.csv --weather-walk nan)
# each rover is read its own way (issue 15): rover_own/rover.gpx is
# rover.gpx with its pressure in Pa in <x:baro> (no unit attribute), beside
# base.csv's "pressure [hPa]" column; read with --rover's own options it
# gives the very table of rover.gpx read as it is (golden_table's). The
# survey's --pressure-field and --pressure-unit stay the default of every
# rover and base, so given for the rover alone they break the base.
set(RO @DATA@/rover_own/rover.gpx)
set(HYP_CASE_INPUTS @DATA@/rover_own/rover.gpx @DATA@/base.csv)
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
hyp_cli_case(rover_own_field_unit 0 "wrote" correct --rover ${RO} --rover-pressure-field baro --rover-pressure-unit Pa ${B} --table @OUT@/t.csv)
# clock_ahead.gpx is rover.gpx with every time an hour later (a logger
# clock one hour ahead): its own clock offset brings it back to true time
hyp_cli_case(rover_own_clock_offset 0 "wrote" correct --rover @DATA@/rover_own/clock_ahead.gpx --rover-clock-offset 3600 ${B} --table @OUT@/t.csv)
# the local-time CSV of golden_csv_rover_local_time with its own zone
hyp_cli_case(rover_own_time_zone 0 "wrote" correct --rover @DATA@/rover_local.csv --rover-time-zone Europe/Vienna ${B} --table @OUT@/t.csv -o @OUT@/t.gpx)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
hyp_cli_case(rover_own_global_default 1 "base.csv:2: header: no \"baro\" column" correct ${RO} --pressure-field baro --pressure-unit Pa ${B} ${O})
hyp_cli_case(rover_own_clock_not_given 1 "clock_ahead.gpx: .*base.csv: the base's clock looks 1 h 00 min behind the rover's" correct @DATA@/rover_own/clock_ahead.gpx ${B} ${O})
hyp_cli_case(rover_own_adjust 0 "lies outside the track rover \\(2026-06-18T07:00:00Z to 2026-06-18T07:30:00Z\\)" adjust --rover ${RO} --rover-pressure-field baro --rover-pressure-unit Pa ${B} --stations @DATA@/benchmarks.csv -o @OUT@/st.csv --occupations @DATA@/adjust/book_outside.csv)
hyp_cli_case(rover_own_adjust_not_given 1 "rover.gpx: no point has a pressure" adjust ${RO} ${B} --stations @DATA@/benchmarks.csv -o @OUT@/st.csv --occupations @DATA@/adjust/book_outside.csv)
# usage errors name the option and what was expected
hyp_cli_case(rover_option_without_rover 2 "--rover-pressure-unit must follow the --rover it applies to" correct ${R} --rover-pressure-unit Pa ${B} ${O})
hyp_cli_case(rover_bad_pressure_unit 2 "--rover-pressure-unit \"bar\": expected one of Pa, hPa, mbar \\(mb, millibar\\), kPa, inHg, mmHg" correct --rover ${RO} --rover-pressure-unit bar ${B} ${O})
hyp_cli_case(rover_bad_temperature_unit 2 "--rover-temperature-unit \"R\": expected one of degC, K, degF" correct --rover ${RO} --rover-temperature-unit R ${B} ${O})
hyp_cli_case(rover_bad_clock_offset 2 "--rover-clock-offset \"1e9\": expected a number from -86400 to 86400" correct --rover ${RO} --rover-clock-offset 1e9 ${B} ${O})
hyp_cli_case(rover_bad_time_zone 2 "--rover-time-zone \\(of --rover .*rover.gpx\\): " correct --rover ${RO} --rover-time-zone Mars/Olympus ${B} ${O})
hyp_cli_case(rover_also_positional 2 "--rover .*rover_own/rover.gpx is also given as a rover \\(or twice\\)" correct ${RO} --rover ${RO} --rover-pressure-field baro ${B} ${O})
hyp_cli_case(rover_given_twice 2 "--rover .*rover_own/rover.gpx is also given as a rover \\(or twice\\)" correct --rover ${RO} --rover ${RO} ${B} ${O})
hyp_cli_case(rover_in_folder 2 "--rover .*rover.gpx is also given as a rover" correct @DATA@/rover_own --rover ${RO} ${B} --out-dir @OUT@)
hyp_cli_case(rover_is_folder 2 "--rover .*rover_own: a folder; --rover names one rover file" correct --rover @DATA@/rover_own ${B} ${O})
set(HYP_CASE_INPUTS "")
# three rovers in one batch, each read its own way (the local-time CSV by
# the survey's --time-zone, the default): all three tables equal
# golden_table's (checked here for rover_own/rover.gpx's)
set(HYP_CASE_INPUTS @DATA@/rover_own/rover.gpx @DATA@/rover_own/clock_ahead.gpx @DATA@/rover_local.csv @DATA@/base.csv)
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT rover.csv)
hyp_cli_case(rover_own_batch 0 "^$" correct --rover @DATA@/rover_own/clock_ahead.gpx --rover-clock-offset 3600 @DATA@/rover_local.csv --time-zone Europe/Vienna --rover ${RO} --rover-pressure-field baro --rover-pressure-unit Pa ${B} --out-dir @OUT@ -q -j 2)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
# barometric-altitude tracks (--baro-altitude): tests/data/rover.gpx's
# pressures as an altimeter's altitudes (0.1 m, re-set from 1016 to 996 hPa
# at 07:15:00); a value that is no height; a step no re-setting can make
set(HYP_CASE_INPUTS @DATA@/baro_alt.gpx @DATA@/base.csv)
hyp_cli_case(baro_alt_ok 0 "baro_alt.gpx:34: barometric altitude re-set at 2026-06-18T07:15:00Z: a step of -164.8 m.*reference before its first re-setting was 1015.6. hPa.*pressure from barometric altitudes\n  altitude  in steps of 0.1 m: quantisation 0.03 m \\(0.3. Pa\\), 1 sigma\n            the recorder's reference before its first re-setting: 1015.6. hPa \\(from the calibrated offset\\)\n            re-set at 2026-06-18T07:15:00Z \\(line 34\\): -164.8 m.*61 of 61 corrected" correct @DATA@/baro_alt.gpx --baro-altitude ele ${B} ${O})
set(HYP_CASE_INPUTS @DATA@/bad/baro_range.gpx @DATA@/base.csv)
hyp_cli_case(baro_alt_range 1 "baro_range.gpx:44: barometric altitude <ele> \"12000\" m is out of range; expected a standard-atmosphere height of -500..9000 m" correct @DATA@/bad/baro_range.gpx --baro-altitude ele ${B} ${O})
set(HYP_CASE_INPUTS @DATA@/bad/baro_step.gpx @DATA@/base.csv)
hyp_cli_case(baro_alt_step 1 "baro_step.gpx:34: barometric altitude steps from 871.2 m to 3871.1 m at 2026-06-18T07:15:00Z: a re-setting that large needs references further apart than the lowest and highest sea-level pressures recorded" correct @DATA@/bad/baro_step.gpx --baro-altitude ele ${B} ${O})
set(HYP_CASE_INPUTS ${R} @DATA@/base.csv)
hyp_cli_case(baro_alt_no_field 1 "rover.gpx: no point has a barometric altitude \\(looked for <alt> in each point's extensions" correct ${R} --baro-altitude alt ${B} ${O})
hyp_cli_case(baro_alt_csv 2 "rover_local.csv: --baro-altitude reads GPX tracks only \\(this is a CSV log\\)" correct @DATA@/rover_local.csv --time-zone Europe/Vienna --baro-altitude ele ${B} ${O})
hyp_cli_case(baro_alt_is_pressure 1 "rover.gpx:4: unit=\"hPa\" on <pressure>: a barometric altitude \\(--baro-altitude\\) is expected in m" correct ${R} --baro-altitude pressure ${B} ${O})
hyp_cli_case(baro_alt_bad_name 2 "--baro-altitude \"a b\": expected ele or the local name of an extension element" correct ${R} --baro-altitude "a b" ${B} ${O})
set(HYP_CASE_INPUTS "")
# times as exports write them (issue 16): the golden table is the one of
# rover.gpx, the same track; day-first dates in a date and a time column
# (the order decided by the dates, pressure in "mb"), a month-first
# 12-hour clock by --time-format (unit " Millibar "), and a base whose
# times are "18 Jun 2026 06:50:00 +0000"
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
set(HYP_CASE_INPUTS @DATA@/rover_dayfirst.csv @DATA@/base.csv)
hyp_cli_case(time_dayfirst_columns 0 "rover_dayfirst.csv:4: dates read day first, as \"18.06.2026 09:00:00\" can only be read so.*pressure in mbar" correct @DATA@/rover_dayfirst.csv --time-zone Europe/Vienna ${B} --table @OUT@/t.csv -o @OUT@/t.gpx)
set(HYP_CASE_INPUTS @DATA@/rover_12h.csv @DATA@/base.csv)
hyp_cli_case(time_format_12h 0 "heights +61 of 61 corrected" correct @DATA@/rover_12h.csv --time-zone Europe/Vienna --time-format "%m/%d/%Y %I:%M:%S %p" ${B} --table @OUT@/t.csv)
set(HYP_CASE_INPUTS @DATA@/rover.gpx @DATA@/base_month_name.csv)
hyp_cli_case(base_time_format 0 "heights +61 of 61 corrected" correct ${R} --base @DATA@/base_month_name.csv --base-height 812.4 --base-at 46.8,9.9 --base-time-format "%d %b %Y %H:%M:%S %z" --table @OUT@/t.csv)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
set(HYP_CASE_INPUTS "")
hyp_cli_case(time_dates_ambiguous 1 "ambiguous_dates.csv:3: time \"03.04.2026 09:00:00\": the date may be day.month or month.day .*give the order with --time-format" correct @DATA@/bad/ambiguous_dates.csv --time-zone UTC ${B} ${O})
hyp_cli_case(time_format_mismatch 1 "rover_dayfirst.csv:4: time \"18.06.2026 09:00:00\" does not match the time format \"%Y-%m-%d %H:%M:%S\"" correct @DATA@/rover_dayfirst.csv --time-zone UTC --time-format "%Y-%m-%d %H:%M:%S" ${B} ${O})
hyp_cli_case(time_format_unknown 2 "--time-format \"%Y-%m-%d %Q\" has %Q, which is not one of" correct @DATA@/rover_dayfirst.csv --time-format "%Y-%m-%d %Q" ${B} ${O})
hyp_cli_case(base_time_format_without_base 2 "--base-time-format must follow the --base it applies to" correct ${R} --base-time-format "%d.%m.%Y %H:%M" ${B} ${O})
# the base never takes the rovers' format: base.csv's ISO times still read
hyp_cli_case(time_format_rover_only 0 "heights +61 of 61 corrected" correct @DATA@/rover_12h.csv --time-zone Europe/Vienna --time-format "%m/%d/%Y %I:%M:%S %p" ${B} ${O})
# pressure as an attribute of an extension element (--pressure-field
# ELEMENT@ATTRIBUTE), unit attribute " mb ": the table of rover.gpx
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
set(HYP_CASE_INPUTS @DATA@/rover_attr.gpx @DATA@/base.csv)
hyp_cli_case(gpx_pressure_attribute_mb 0 "pressure in mbar" correct @DATA@/rover_attr.gpx --pressure-field baro@value ${B} --base-pressure-field pressure --table @OUT@/t.csv -o @OUT@/t.gpx)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
set(HYP_CASE_INPUTS "")
hyp_cli_case(gpx_pressure_attribute_missing 1 "rover_attr.gpx:5: <baro> has no val attribute" correct @DATA@/rover_attr.gpx --pressure-field baro@val ${B} --base-pressure-field pressure ${O})
# a rover from standard input ("-"), spooled under TMPDIR and removed after
# the run (tests/cli/stdin_case.cmake): corrected as rover.gpx is; a bad log
# refused and its copy removed; -o required
function(hyp_stdin_case name rc regex input)
  add_test(NAME cli_${name}
    COMMAND ${CMAKE_COMMAND} -DEXE=$<TARGET_FILE:hypsolev-cli> -DDATA=${PROJECT_SOURCE_DIR}/tests/data
            -DWORK=${CMAKE_CURRENT_BINARY_DIR}/cli/${name} -DEXPECT_RC=${rc} "-DEXPECT_ERR=${regex}"
            -DINPUT=${input} "-DARGS=${ARGN}" "-DGOLDEN=${HYP_CASE_GOLDEN}" "-DGOLDEN_OUT=${HYP_CASE_GOLDEN_OUT}"
            -P ${PROJECT_SOURCE_DIR}/tests/cli/stdin_case.cmake)
  set_tests_properties(cli_${name} PROPERTIES LABELS cli TIMEOUT 150)
endfunction()
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
hyp_stdin_case(stdin_rover_gpx 0 "hypsolev correct: stdin\n.*heights +61 of 61 corrected" @DATA@/rover.gpx correct - ${B} -o @OUT@/t.gpx --table @OUT@/t.csv)
hyp_stdin_case(stdin_rover_csv 0 "dates read day first" @DATA@/rover_dayfirst.csv correct - --time-zone Europe/Vienna ${B} -o @OUT@/t.gpx --table @OUT@/t.csv)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
hyp_stdin_case(stdin_rover_bad 1 "error: stdin:3: time \"03.04.2026 09:00:00\": the date may be day.month or month.day" @DATA@/bad/ambiguous_dates.csv correct - --time-zone UTC ${B} -o @OUT@/t.gpx)
hyp_stdin_case(stdin_rover_needs_output 2 "a rover from standard input \\(-\\) needs -o FILE" @DATA@/rover.gpx correct - ${B} --table @OUT@/t.csv)
hyp_stdin_case(stdin_rover_only_one 2 "a rover from standard input \\(-\\) must be the only rover" @DATA@/rover.gpx correct - @DATA@/rover.gpx ${B} --out-dir @OUT@)
# inspect reads times by --time-format too: 06/18/2026 09:00:00 AM in
# Vienna is 07:00 UTC (date -u -d "2026-06-18 09:00:00 +0200" +%FT%TZ),
# 09:30:00 AM 07:30 UTC
set(HYP_CASE_OUT "span        2026-06-18T07:00:00Z to 2026-06-18T07:30:00Z")
hyp_cli_case(inspect_time_format 0 "" inspect @DATA@/rover_12h.csv --time-zone Europe/Vienna --time-format "%m/%d/%Y %I:%M:%S %p")
set(HYP_CASE_OUT "")
hyp_cli_case(inspect_time_format_bad 2 "--time-format \"%m/%d/%Y %I:%M:%S\" has %I \\(12-hour clock\\) without %p" inspect @DATA@/rover_12h.csv --time-format "%m/%d/%Y %I:%M:%S")
# a time that is no stamp names the option that gives a format
hyp_cli_case(time_not_a_stamp 1 "bad_time_syntax.csv:3: time \"18.06.2026\" is not a time; expected ISO 8601 .*give the format with --time-format" correct @DATA@/bad/bad_time_syntax.csv --time-zone UTC ${B} ${O})
# a base folder's index gives a log's time format in its time_format column
set(HYP_CASE_GOLDEN ${PROJECT_SOURCE_DIR}/tests/cli/expected/rover_table.csv)
set(HYP_CASE_GOLDEN_OUT t.csv)
set(HYP_CASE_INPUTS @DATA@/rover.gpx @DATA@/basedir_time_format/base.csv @DATA@/basedir_time_format/bases.csv)
hyp_cli_case(base_dir_time_format 0 "heights +61 of 61 corrected" correct ${R} --base-dir @DATA@/basedir_time_format --table @OUT@/t.csv)
set(HYP_CASE_GOLDEN "")
set(HYP_CASE_GOLDEN_OUT "")
set(HYP_CASE_INPUTS "")
hyp_cli_case(base_dir_time_format_bad 1 "basedir_bad_format/bases.csv:3: time_format \"%d.%m.%Y %Q\" has %Q, which is not one of" correct ${R} --base-dir @DATA@/bad/basedir_bad_format ${O})
# the rover list is expanded by the library (hyp_rover_list_expand): a
# folder with no log and a pattern matching nothing are errors naming them
hyp_cli_case(rovers_empty_folder 1 "cli/rovers_empty_folder: a folder with no .gpx or .csv file" correct @OUT@ ${B} -o @OUT@/x.gpx)
hyp_cli_case(rovers_pattern_no_match 1 "rovers_pattern_no_match/\\*.zzz: no file matches" correct @OUT@/*.zzz ${B} -o @OUT@/x.gpx)
# a field book none of whose windows falls in a track (fuzz_network found
# the empty window list sorted through a NULL pointer: UB; the input is
# tests/fuzz/regress/network/book-outside-tracks.csv)
hyp_cli_case(adjust_book_all_outside 0 "book_all_outside.csv:2: the window on BM-1 lies outside the track rover.*book_all_outside.csv:3: the window on BM-2 lies outside.*station BM-1: occupied by no rover.*2 stations in the file, 0 solved" adjust @DATA@/rover.gpx ${B} --stations @DATA@/benchmarks.csv --occupations @DATA@/adjust/book_all_outside.csv --no-find-occupations -o @OUT@/st.csv)
# a name or time longer than its field is refused, not cut short (a cut
# name would no longer be the one given; a cut time could read as valid)
hyp_cli_case(adjust_station_name_too_long 1 "stations_long_name.csv:3: name \"BM-1-the-bolt-on-the-nor...\" is 67 bytes long; expected at most 63" adjust @DATA@/rover.gpx ${B} --stations @DATA@/adjust/stations_long_name.csv -o @OUT@/st.csv)
hyp_cli_case(adjust_book_time_too_long 1 "book_long_time.csv:3: start \"2026-06-18T07:20:00Z    ...\" is 105 bytes long; expected at most 95" ${A} --occupations @DATA@/adjust/book_long_time.csv)
