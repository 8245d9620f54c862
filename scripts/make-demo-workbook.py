#!/usr/bin/python3
"""Writes demo/data/glass-inspections.xlsx with openpyxl (Debian's python3-openpyxl), seeded, so it is the
same on every machine: /usr/bin/python3 scripts/make-demo-workbook.py. The scenario is invented: a glassworks'
inspection log, one sheet per production line, a title row above the table, inspections from B3 down."""
import datetime
import os
import random

import openpyxl

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'demo', 'data', 'glass-inspections.xlsx')
DEFECTS = ['none', 'bubble', 'stone', 'crack']
SHIFTS = ['early', 'late', 'night']


def line(ws, rng, rows, night_bias):
    ws['B1'] = 'Inspection log (invented data): one row per inspected jar'
    for j, name in enumerate(['jar', 'inspected_on', 'shift', 'defect', 'weight_g', 'passed']):
        ws.cell(row=3, column=2 + j, value=name)
    for i in range(rows):
        r = 4 + i
        shift = rng.choice(SHIFTS)
        weights = [78, 10, 7, 5] if shift != 'night' else [78 - night_bias, 10 + night_bias // 2, 7, 5 + night_bias - night_bias // 2]
        defect = rng.choices(DEFECTS, weights)[0]
        ws.cell(row=r, column=2, value=20000 + i)
        ws.cell(row=r, column=3, value=datetime.date(2026, 10, 5) + datetime.timedelta(days=i // 40))
        ws.cell(row=r, column=4, value=shift)
        ws.cell(row=r, column=5, value=defect if rng.random() > 0.01 else None)
        ws.cell(row=r, column=6, value=round(rng.gauss(212.0, 1.6), 2))
        ws.cell(row=r, column=7, value=defect == 'none')
        ws.cell(row=r, column=3).number_format = 'yyyy-mm-dd'


def main():
    rng = random.Random(20261203)
    wb = openpyxl.Workbook()
    first = wb.active
    first.title = 'Line 1'
    line(first, rng, 360, 0)
    line(wb.create_sheet('Line 2'), rng, 480, 24)
    wb.save(OUT)
    print('wrote', OUT)


if __name__ == '__main__':
    main()
