# The planner reads the beds and builds a schedule.
# Each bed gets its own plan.
require "json"

=begin
The documentation block says how windows are merged
when two of them overlap.
=end

module Planner
  # Readings older than a day are dropped.
  LIMIT = 24 * 60 # minutes in a day
  NAME = "not # a comment"
  GLOB = %w[a b#c]
  PATTERN = /#not-a-comment/
  HASH = 'single # quoted'

  def self.plan(beds)
    text = <<~EOS
      # inside a here document
    EOS
    beds.map { |bed| bed * 2 } # doubled for the demo
  end
end
__END__
# data after the end marker
