#!/usr/bin/env bash
# Rewrite citations of the old, unpublished source notes into anchors of docs/references.md.
#
# Handled forms, by example ("§6.1–6.4" ranges become two anchors joined by "to"):
#   a path to the old notes file under a "shared" folder  -> docs/references.md
#   "<notes file> §9", "<notes file> section 9"           -> docs/references.md#s9
#   "reference notes §6.6", "Notes §11"                    -> docs/references.md#s6-6, ...#s11
#   a bare "§8.3" on a line that cites no other work       -> docs/references.md#s8-3
#   the notes file or "reference notes" without a section  -> docs/references.md
# A subsection without its own anchor falls back to its section's anchor. Only sections 1–13
# are rewritten: the old notes' later sections have no counterpart in docs/references.md, so
# such a citation is reported and left for a person to fix. A bare "§" on a line that also cites
# another work ("Chopra §13", "Ewins, Modal Testing, 2000, §2.2") belongs to that work and is
# left alone.
#
# Usage: scripts/rewrite-citations.sh [--check] [--skip PATH]...
#   --check  change nothing; list what would change and exit 1 if anything would.
#   --skip   leave this file (path from the repository root) untouched; repeatable.
# Idempotent: a second run changes nothing. Files come from `git ls-files` (tracked files).
set -euo pipefail
cd "$(dirname "$0")/.."

check=0
skips=("scripts/rewrite-citations.sh" "docs/references.md")
while [ $# -gt 0 ]; do
    case "$1" in
        --check) check=1 ;;
        --skip) shift; skips+=("${1:?--skip needs a path}") ;;
        *) echo "usage: $0 [--check] [--skip PATH]..." >&2; exit 2 ;;
    esac
    shift
done

anchors=$(grep -o '<a id="s[0-9-]*"></a>' docs/references.md | sed 's/<a id="\(.*\)"><\/a>/\1/' | tr '\n' ' ')
[ -n "$anchors" ] || { echo "no anchors found in docs/references.md" >&2; exit 2; }

files=()
while IFS= read -r f; do
    for s in "${skips[@]}"; do [ "$f" = "$s" ] && continue 2; done
    [ -f "$f" ] && grep -Iq . "$f" 2>/dev/null && files+=("$f")
done < <(git ls-files)

CHECK=$check ANCHORS="$anchors" perl -CSD -Mutf8 -e '
use strict; use warnings;
my %have = map { $_ => 1 } split / /, $ENV{ANCHORS};
my $page = "docs/references.md";
my $notes = "REFERENCES\\.md";
my $num = qr/\d+(?:\.\d+)?/;
my $range = qr/($num)(?:\s*(?:–|—|\bto\b)\s*($num))?/;
my ($lines_before, $lines_after, $changed_files, @unmapped) = (0, 0, 0);
my $other_work = qr/(?:(?:19|20)\d\d,\s*§|\b[A-Z][a-z]+,?\s+§)/;   # "1993, §12-3", "Chopra §13"
my $bare = qr/(?<![#\w])§\s?$range(?![\d-])/;

sub anchor {
    my ($n, $where) = @_;
    my ($sec) = $n =~ /^(\d+)/;
    if ($sec < 1 || $sec > 13) { push @unmapped, "$where: §$n"; return undef; }
    (my $id = "s$n") =~ s/\./-/g;
    $id = "s$sec" unless $have{$id};
    return "$page#$id";
}
sub cite {
    my ($a, $b, $where, $orig) = @_;
    my $x = anchor($a, $where) // return $orig;
    return $x unless defined $b;
    (my $bb = $b) =~ s/^(\d+)$/$a =~ m{^(\d+)\.} ? "$1.$b" : $b/e;   # "6.1–4" means 6.1 to 6.4
    my $y = anchor($bb, $where) // return $orig;
    return "$x to $y";
}
sub old_citation { my $l = shift; return $l =~ /$notes/ || $l =~ /reference\s+notes|\bnotes\s*§/i || ($l =~ $bare && $l !~ $other_work); }

for my $f (@ARGV) {
    open(my $fh, "<:encoding(UTF-8)", $f) or die "$f: $!";
    my @lines = <$fh>; close $fh;
    my $dirty = 0;
    for my $i (0 .. $#lines) {
        my $l = $lines[$i];
        next unless old_citation($l);
        $lines_before++;
        my $w = "$f:" . ($i + 1);
        my $orig = $l;
        $l =~ s{(?:\.\./|/work/)?shared/$notes}{$page}g;
        $l =~ s{$notes,?\s*(?:§\s?|section\s+)$range}{cite($1, $2, $w, $&)}ge;
        $l =~ s{(?:\bthe\s+(?:project\x27s\s+)?(?=reference))?(?i:reference\s+notes|notes),?\s*(?:§\s?|section\s+)$range}{cite($1, $2, $w, $&)}ge;
        $l =~ s{$bare}{cite($1, $2, $w, $&)}ge unless $l =~ $other_work;
        $l =~ s{$notes}{$page}g;
        $l =~ s{(?:\bthe\s+(?:project\x27s\s+)?)?(?i:reference\s+notes)}{$page}g;
        $lines_after++ if old_citation($l);
        if ($l ne $orig) { $lines[$i] = $l; $dirty = 1; print "$w\n" if $ENV{CHECK}; }
    }
    next unless $dirty;
    $changed_files++;
    next if $ENV{CHECK};
    open(my $out, ">:encoding(UTF-8)", $f) or die "$f: $!";
    print $out @lines; close $out;
}
my $verb = $ENV{CHECK} ? "would change" : "changed";
print "lines citing the old notes: $lines_before before, $lines_after after; $verb $changed_files files\n";
print "left for a person (no counterpart in $page): $_\n" for @unmapped;
exit(($ENV{CHECK} && $changed_files) ? 1 : 0);
' "${files[@]}"
