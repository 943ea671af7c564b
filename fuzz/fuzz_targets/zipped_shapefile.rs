#![no_main]
libfuzzer_sys::fuzz_target!(|data: &[u8]| reknit::fuzzing::zipped_shapefile(data));
