// Match doubled slashes in paths.
const re = /\/\/+/g; // collapse them
const t = `template // not a comment ${value}`;
const half = total / 2; // plain division
/* Block comment at the end. */
