#!/usr/bin/env bash
# Restores a dump made by infra/backup.sh into an EMPTY database (create it first: createdb gloss_restored).
# All or nothing: one transaction, stopping at the first error. Stop the Gloss nodes (or point them at
# the restored database only once this has finished).
#   infra/restore.sh /backups/gloss-2026-12-01.dump postgres://gloss:…@db-host:5432/gloss_restored
set -euo pipefail
if [ $# -ne 2 ]; then echo "usage: $0 DUMP_FILE DATABASE_URL" >&2; exit 2; fi
pg_restore --no-owner --no-privileges --exit-on-error --single-transaction --dbname "$2" "$1"
echo "restored $1"
