#!/usr/bin/env bash
# Backs up a Gloss database with PostgreSQL's own pg_dump, in its custom format (compressed; restored
# with infra/restore.sh or pg_restore). The dump holds interview data: encrypt it where it is kept.
#   infra/backup.sh postgres://gloss:…@db-host:5432/gloss /backups/gloss-$(date +%F).dump
set -euo pipefail
if [ $# -ne 2 ]; then echo "usage: $0 DATABASE_URL OUTPUT_FILE" >&2; exit 2; fi
# --no-owner / --no-privileges: the restore may run as another role on another host.
pg_dump --format=custom --no-owner --no-privileges --file "$2" "$1"
echo "backed up to $2 ($(wc -c <"$2") bytes)"
