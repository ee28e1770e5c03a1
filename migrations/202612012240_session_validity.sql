-- Sessions issued before this instant are refused: set on password change, reset and deactivation.
alter table users add column sessions_valid_after timestamptz not null default '-infinity';
