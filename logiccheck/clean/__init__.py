"""Cleaning: a policy applied to the route state and quality findings, giving a cleaned
export and an audit trail that undoes every change."""
