import { Pipe, PipeTransform } from '@angular/core';

/** Latitude and longitude in degrees as `51.5072° N, 0.1276° W`. */
export function formatLocation(latitudeDeg: number, longitudeDeg: number): string {
  const lat = `${Math.abs(latitudeDeg).toFixed(4)}° ${latitudeDeg < 0 ? 'S' : 'N'}`;
  const lon = `${Math.abs(longitudeDeg).toFixed(4)}° ${longitudeDeg < 0 ? 'W' : 'E'}`;
  return `${lat}, ${lon}`;
}

@Pipe({ name: 'location' })
export class LocationPipe implements PipeTransform {
  transform(site: { latitudeDeg: number; longitudeDeg: number }): string {
    return formatLocation(site.latitudeDeg, site.longitudeDeg);
  }
}
