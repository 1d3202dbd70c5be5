"""One panel per step of the work: the data → the outcome and predictors → the tree's size →
the tree → checking it → the chart."""
