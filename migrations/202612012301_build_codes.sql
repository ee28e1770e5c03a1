-- Readable build codes (B-1000, B-1001, ...) handed out without a race between two technicians.
create sequence build_code_seq start 1000;
