#!/bin/sh
# Build the release archive.
name="release # not a comment"
echo '# not' $# ${#name} value#kept
cat <<EOT
# inside a here document
EOT
tar cf out.tar . # pack everything
