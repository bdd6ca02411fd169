"""Peak surface fields refined to a target accuracy, their margins to air breakdown and corona
onset, and the one caution rule that every view shows."""
