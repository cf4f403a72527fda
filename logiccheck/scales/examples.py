"""The answer list the scale checks' docs examples share (`logiccheck explain`)."""

AGREE5 = '''codes agree5
  sd = 1 "Strongly disagree"
  d  = 2 "Disagree"
  n  = 3 "Neither agree nor disagree"
  a  = 4 "Agree"
  sa = 5 "Strongly agree"
'''
